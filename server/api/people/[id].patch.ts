import { personPatchSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const userId = idParam(event)
  const patch = await readJson(event, personPatchSchema)
  return updatePerson(event, actor, userId, patch)
})
