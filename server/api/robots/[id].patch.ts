import { robotPatchSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findRobot } from '#server/robots/queries'
import { editRobot } from '#server/robots/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const robot = authorize(actor, 'robot.edit', await findRobot(db, actor, idParam(event)), 'No such robot.')
  const patch = await readJson(event, robotPatchSchema)
  return editRobot(db, actor, robot, patch)
})
