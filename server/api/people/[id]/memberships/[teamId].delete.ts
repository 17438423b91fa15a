import { useDb } from '#server/platform/db'
import { setMembership } from '#server/people/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'people.manage')
  return setMembership(useDb(), actor, idParam(event), idParam(event, 'teamId'), null)
})
