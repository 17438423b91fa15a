import { filmTestSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findFilm } from '#server/films/service'
import { recordTest } from '#server/films/test-cuts'

// The square of the test grid that weeded cleanly (or none): the film's laser settings from now on.
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'film.test')
  const db = useDb()
  const { id } = await findFilm(db, actor, idParam(event))
  const input = await readJson(event, filmTestSchema)
  const film = await recordTest(db, actor, id, input)
  setResponseStatus(event, 201)
  return film
})
