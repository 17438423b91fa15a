import { filmStockSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findFilm, recordStock } from '#server/films/service'

// A delivery of sheets, or a count of the shelf.
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'film.manage')
  const db = useDb()
  const { id } = await findFilm(db, actor, idParam(event))
  const input = await readJson(event, filmStockSchema)
  return recordStock(db, actor, id, input)
})
