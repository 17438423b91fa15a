import { acceptInvitationSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { acceptInvitation } from '#server/people/invitations'

export default defineEventHandler(async (event) => {
  const input = await readJson(event, acceptInvitationSchema)
  const userId = await acceptInvitation(useDb(), tokenParam(event), input, requestIp(event))
  return startSession(event, userId)
})
