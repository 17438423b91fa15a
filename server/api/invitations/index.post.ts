import { invitationSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { createInvitation } from '#server/people/invitations'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'people.manage')
  const input = await readJson(event, invitationSchema)
  const invitation = await idempotent(event, actor, () => createInvitation(useDb(), actor, input))
  setResponseStatus(event, 201)
  return invitation
})
