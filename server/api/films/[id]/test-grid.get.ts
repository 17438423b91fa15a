import { testGridQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findFilm } from '#server/films/service'
import { gridPlan } from '#server/films/test-cuts'

// Which square of the test grid is cut at what, for the page's table (the files: test-grid.svg, .dxf).
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'film.test')
  const film = await findFilm(useDb(), actor, idParam(event))
  return gridPlan(film, readQuery(event, testGridQuerySchema))
})
