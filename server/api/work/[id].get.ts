import { useDb } from '#server/platform/db'
import { findWork } from '#server/work/items'

// The progress and, once done, the result of a piece of background work the actor asked for.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const item = await findWork(useDb(), actor, idParam(event))
  if (!item) throw createError({ statusCode: 404, message: 'No such work.' })
  return item
})
