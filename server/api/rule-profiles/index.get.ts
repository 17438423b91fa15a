import { useDb } from '#server/platform/db'
import { ruleProfilesPage } from '#server/plates/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  return ruleProfilesPage(useDb(), actor)
})
