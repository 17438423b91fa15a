import { chooseRuleProfileSchema } from '#shared/plates/schemas'
import { useDb } from '#server/platform/db'
import { chooseRuleProfile } from '#server/plates/service'

// The mentor chooses the rules every team's plates are checked against (or none, with null).
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'program.manage')
  const { ruleProfileId } = await readJson(event, chooseRuleProfileSchema)
  return chooseRuleProfile(useDb(), actor, ruleProfileId)
})
