import { useDb } from '#server/platform/db'
import { findRevision } from '#server/artworks/queries'
import { revisionDetail } from '#server/artworks/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const revision = authorize(actor, 'artwork.view', await findRevision(db, actor, idParam(event)), 'No such revision.')
  return revisionDetail(db, revision)
})
