export default defineEventHandler(async (event) => reviewQueue(await requireMentor(event)))
