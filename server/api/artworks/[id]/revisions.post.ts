import { revisionRequestSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findArtwork } from '#server/artworks/queries'
import { createdRevision, requestRevision } from '#server/artworks/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const artwork = authorize(actor, 'artwork.revise', await findArtwork(db, actor, idParam(event)), 'No such artwork.')
  const input = await readJson(event, revisionRequestSchema)
  const workItemId = await idempotent(event, actor, () => requestRevision(db, actor, artwork, input))
  return answerWhenDone(event, actor, workItemId, (done) => createdRevision(db, actor, done))
})
