import { revisionRequestSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findArtwork } from '#server/artworks/queries'
import { createRevision } from '#server/artworks/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const artwork = authorize(actor, 'artwork.revise', await findArtwork(db, actor, idParam(event)), 'No such artwork.')
  const input = await readJson(event, revisionRequestSchema)
  const revision = await idempotent(event, actor, () => createRevision(db, actor, artwork, input))
  setResponseStatus(event, 201)
  return revision
})
