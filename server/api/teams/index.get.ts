export default defineEventHandler(async (event) => listTeams(await requireActor(event)))
