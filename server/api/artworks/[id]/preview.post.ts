import { revisionRequestSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findArtwork } from '#server/artworks/queries'
import { previewArtwork } from '#server/artworks/preview'

// The tuning bench's live outline: the same pipeline at screen resolution; nothing is stored.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const artwork = authorize(actor, 'artwork.revise', await findArtwork(db, actor, idParam(event)), 'No such artwork.')
  const input = await readJson(event, revisionRequestSchema)
  const withdrawn = new AbortController()
  // The connection closing before we answered means the bench no longer wants this preview.
  event.node.res.once('close', () => { if (!event.node.res.writableEnded) withdrawn.abort() })
  return previewArtwork(db, artwork, input, withdrawn.signal)
})
