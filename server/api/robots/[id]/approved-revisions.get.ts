import { useDb } from '#server/platform/db'
import { findRobot } from '#server/robots/queries'
import { approvedRevisions } from '#server/robots/service'

// What may go on this robot: every approved revision of its team's artworks, in one answer.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const robot = authorize(actor, 'placement.create', await findRobot(db, actor, idParam(event)), 'No such robot.')
  return approvedRevisions(db, robot)
})
