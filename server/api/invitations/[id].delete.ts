import { useDb } from '#server/platform/db'
import { withdrawInvitation } from '#server/people/invitations'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'people.manage')
  await withdrawInvitation(useDb(), actor, idParam(event))
  setResponseStatus(event, 204)
  return null
})
