import { placementSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findRobot } from '#server/robots/queries'
import { createPlacement } from '#server/robots/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const input = await readJson(event, placementSchema)
  const db = useDb()
  const robot = authorize(actor, 'placement.create', await findRobot(db, actor, input.robotId), 'No such robot.')
  const placement = await idempotent(event, actor, () => createPlacement(db, actor, robot, input))
  setResponseStatus(event, 201)
  return placement
})
