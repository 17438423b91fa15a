import { teamSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const input = await readJson(event, teamSchema)
  setResponseStatus(event, 201)
  return createTeam(event, actor, input)
})
