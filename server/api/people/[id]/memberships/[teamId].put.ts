import { membershipSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const userId = idParam(event)
  const teamId = idParam(event, 'teamId')
  const { role } = await readJson(event, membershipSchema)
  return setMembership(event, actor, userId, teamId, role)
})
