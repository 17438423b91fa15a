import { personPatchSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { updatePerson } from '#server/people/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'people.manage')
  const userId = idParam(event)
  const patch = await readJson(event, personPatchSchema)
  return updatePerson(useDb(), actor, userId, patch)
})
