import { filmTestSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { recordTest } from '#server/films/test-cuts'

// The square of the test grid that weeded cleanly (or none): the film's laser settings from now on.
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'film.test')
  const id = idParam(event)
  const input = await readJson(event, filmTestSchema)
  const film = await recordTest(useDb(), actor, id, input)
  setResponseStatus(event, 201)
  return film
})
