import { teamPatchSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const teamId = idParam(event)
  const patch = await readJson(event, teamPatchSchema)
  await updateTeam(event, actor, teamId, patch)
  return teamDetail(actor, teamId)
})
