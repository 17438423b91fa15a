import { useDb } from '#server/platform/db'
import { findRevision } from '#server/artworks/queries'
import { submitRevision } from '#server/review/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const revision = authorize(actor, 'revision.submit', await findRevision(db, actor, idParam(event)), 'No such revision.')
  return submitRevision(db, actor, revision)
})
