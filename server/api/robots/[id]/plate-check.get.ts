import { useDb } from '#server/platform/db'
import { findRobot } from '#server/robots/queries'
import { robotPlateCheck } from '#server/plates/robot-check'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const robot = authorize(actor, 'robot.view', await findRobot(db, actor, idParam(event)), 'No such robot.')
  return robotPlateCheck(db, actor, robot)
})
