import { applySpareSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findPlacement } from '#server/robots/queries'
import { applySpare } from '#server/robots/service'

// Spares from the shelf put on the robot (before asking for a reprint).
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const placement = authorize(actor, 'placement.reprint', await findPlacement(db, actor, idParam(event)), 'No such placement.')
  const input = await readJson(event, applySpareSchema)
  return applySpare(db, actor, placement, input)
})
