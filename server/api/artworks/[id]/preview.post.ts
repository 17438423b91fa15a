import { revisionRequestSchema } from '#shared/utils/schemas'

// The tuning bench's live outline: the same pipeline at screen resolution; nothing is stored.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const artworkId = idParam(event)
  const input = await readJson(event, revisionRequestSchema)
  return previewArtwork(actor, artworkId, input)
})
