export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  return listPeople(actor.programId)
})
