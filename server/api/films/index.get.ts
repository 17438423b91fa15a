export default defineEventHandler(async (event) => listFilms(await requireActor(event)))
