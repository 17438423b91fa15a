import { useDb } from '#server/platform/db'
import { notFound } from '#server/platform/http'
import { findRuleProfile } from '#server/plates/queries'
import { toProfileView } from '#server/plates/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const row = await findRuleProfile(useDb(), actor.programId, idParam(event))
  const view = row && toProfileView(row)
  if (!view) throw notFound('No such rule profile.')
  return view
})
