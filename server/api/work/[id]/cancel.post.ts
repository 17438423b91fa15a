import { useDb } from '#server/platform/db'
import { cancelWork, findWork } from '#server/work/items'

// Cancels work the actor asked for that has not started yet.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const item = await findWork(db, actor, idParam(event))
  if (!item) throw createError({ statusCode: 404, message: 'No such work.' })
  if (!item.can.cancel && item.state === 'queued') throw createError({ statusCode: 403, message: 'Only the person who asked for this may cancel it.' })
  if (!(await cancelWork(db, item.id))) throw createError({ statusCode: 409, message: 'This has already started or finished, so it cannot be cancelled.' })
  return findWork(db, actor, item.id)
})
