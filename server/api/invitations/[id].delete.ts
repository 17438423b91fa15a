export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  await withdrawInvitation(event, actor, idParam(event))
  setResponseStatus(event, 204)
  return null
})
