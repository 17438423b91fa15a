export default defineEventHandler(async (event) => {
  const teamId = idParam(event)
  const actor = await requireRole(event, teamId, 'student')
  return teamDetail(actor, teamId)
})
