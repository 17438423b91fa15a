import { reprintSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findPlacement } from '#server/robots/queries'
import { requestReprint } from '#server/robots/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const placement = authorize(actor, 'placement.reprint', await findPlacement(db, actor, idParam(event)), 'No such placement.')
  const input = await readJson(event, reprintSchema)
  const reprint = await idempotent(event, actor, () => requestReprint(db, actor, placement, input))
  setResponseStatus(event, 201)
  return reprint
})
