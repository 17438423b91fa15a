import { useDb } from '#server/platform/db'
import { listFilms } from '#server/films/service'

export default defineEventHandler(async (event) => listFilms(useDb(), await requireActor(event)))
