import { testGridQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findFilm } from '#server/films/service'
import { gridFile } from '#server/films/test-cuts'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'film.test')
  const film = await findFilm(useDb(), actor, idParam(event))
  return sendCutSheet(event, gridFile(film, readQuery(event, testGridQuerySchema), 'dxf'), 'dxf', 1)
})
