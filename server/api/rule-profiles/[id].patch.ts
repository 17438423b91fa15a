import { ruleProfilePatchSchema } from '#shared/plates/schemas'
import { useDb } from '#server/platform/db'
import { notFound } from '#server/platform/http'
import { findRuleProfile } from '#server/plates/queries'
import { editRuleProfile } from '#server/plates/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'program.manage')
  const db = useDb()
  const row = await findRuleProfile(db, actor.programId, idParam(event))
  if (!row) throw notFound('No such rule profile.')
  const patch = await readJson(event, ruleProfilePatchSchema)
  return editRuleProfile(db, actor, row, patch)
})
