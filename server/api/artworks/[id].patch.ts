import { artworkPatchSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findArtwork } from '#server/artworks/queries'
import { renameArtwork } from '#server/artworks/rename'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const artwork = authorize(actor, 'artwork.revise', await findArtwork(db, actor, idParam(event)), 'No such artwork.')
  const { title } = await readJson(event, artworkPatchSchema)
  return renameArtwork(db, actor, artwork, title)
})
