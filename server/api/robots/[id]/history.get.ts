import { useDb } from '#server/platform/db'
import { findRobot } from '#server/robots/queries'
import { historyOf } from '#server/history/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const robot = authorize(actor, 'robot.view', await findRobot(db, actor, idParam(event)), 'No such robot.')
  return historyOf(db, actor, { robotId: robot.id })
})
