import { useDb } from '#server/platform/db'
import { teamInScope } from '#server/people/queries'
import { teamDetail } from '#server/people/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const team = authorize(actor, 'team.members', await teamInScope(db, actor, idParam(event)), 'No such team.')
  return teamDetail(db, actor, team)
})
