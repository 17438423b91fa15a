import { newRuleProfileSchema } from '#shared/plates/schemas'
import { useDb } from '#server/platform/db'
import { addRuleProfile } from '#server/plates/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'program.manage')
  const input = await readJson(event, newRuleProfileSchema)
  const profile = await idempotent(event, actor, () => addRuleProfile(useDb(), actor, input))
  setResponseStatus(event, 201)
  return profile
})
