import { robotSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { teamInScope } from '#server/people/queries'
import { createRobot } from '#server/robots/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'robot.create')
  const input = await readJson(event, robotSchema)
  const db = useDb()
  const team = authorize(actor, 'team.view', await teamInScope(db, actor, input.teamId), 'No such team.')
  const robot = await idempotent(event, actor, () => createRobot(db, actor, team, input))
  setResponseStatus(event, 201)
  return robot
})
