import { acceptInvitationSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const input = await readJson(event, acceptInvitationSchema)
  return acceptInvitation(event, getRouterParam(event, 'token') ?? '', input)
})
