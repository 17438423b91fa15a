import { filmSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { createFilm } from '#server/films/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'film.manage')
  const input = await readJson(event, filmSchema)
  const film = await idempotent(event, actor, () => createFilm(useDb(), actor, input))
  setResponseStatus(event, 201)
  return film
})
