import { reviewSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findRevision } from '#server/artworks/queries'
import { reviewRevision } from '#server/review/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'revision.review')
  const db = useDb()
  const revision = authorize(actor, 'artwork.view', await findRevision(db, actor, idParam(event)), 'No such revision.')
  const input = await readJson(event, reviewSchema)
  return reviewRevision(db, actor, revision, input)
})
