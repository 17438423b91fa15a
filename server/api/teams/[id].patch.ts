import { teamPatchSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { updateTeam } from '#server/people/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'team.manage')
  const teamId = idParam(event)
  const patch = await readJson(event, teamPatchSchema)
  return updateTeam(useDb(), actor, teamId, patch)
})
