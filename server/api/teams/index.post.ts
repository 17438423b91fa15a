import { teamSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { createTeam } from '#server/people/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'team.manage')
  const input = await readJson(event, teamSchema)
  const team = await idempotent(event, actor, () => createTeam(useDb(), actor, input))
  setResponseStatus(event, 201)
  return team
})
