import { revisionRequestSchema } from '#shared/utils/schemas'

// The tuning bench's live outline: the same pipeline at screen resolution; nothing is stored.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const artworkId = idParam(event)
  const input = await readJson(event, revisionRequestSchema)
  const withdrawn = new AbortController()
  // The connection closing before we answered means the bench no longer wants this preview.
  event.node.res.once('close', () => { if (!event.node.res.writableEnded) withdrawn.abort() })
  return previewArtwork(actor, artworkId, input, withdrawn.signal)
})
