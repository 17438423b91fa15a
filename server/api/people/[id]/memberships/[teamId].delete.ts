export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  return setMembership(event, actor, idParam(event), idParam(event, 'teamId'), null)
})
