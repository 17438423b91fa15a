import { membershipSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { setMembership } from '#server/people/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'people.manage')
  const userId = idParam(event)
  const teamId = idParam(event, 'teamId')
  const { role } = await readJson(event, membershipSchema)
  return setMembership(useDb(), actor, userId, teamId, role)
})
