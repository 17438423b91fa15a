import { filmPatchSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const id = idParam(event)
  const patch = await readJson(event, filmPatchSchema)
  return updateFilm(event, actor, id, patch)
})
