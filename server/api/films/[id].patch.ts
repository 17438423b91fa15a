import { filmPatchSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { updateFilm } from '#server/films/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'film.manage')
  const id = idParam(event)
  const patch = await readJson(event, filmPatchSchema)
  return updateFilm(useDb(), actor, id, patch)
})
