import { useDb } from '#server/platform/db'
import { findRobot } from '#server/robots/queries'
import { toRobotView } from '#server/robots/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  return toRobotView(actor, authorize(actor, 'robot.view', await findRobot(useDb(), actor, idParam(event)), 'No such robot.'))
})
