import { placementRemovalSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findPlacement } from '#server/robots/queries'
import { removePlacement } from '#server/robots/service'

// Takes the decal off the robot, with the reason in the body.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const placement = authorize(actor, 'placement.edit', await findPlacement(db, actor, idParam(event)), 'No such placement.')
  const { reason } = await readJson(event, placementRemovalSchema)
  return removePlacement(db, actor, placement, reason)
})
