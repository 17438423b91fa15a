import { invitationSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const input = await readJson(event, invitationSchema)
  const invitation = await createInvitation(event, actor, input)
  setResponseStatus(event, 201)
  return invitation
})
