import { useDb } from '#server/platform/db'
import { findArtwork } from '#server/artworks/queries'
import { artworkDetail } from '#server/artworks/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const artwork = authorize(actor, 'artwork.view', await findArtwork(db, actor, idParam(event)), 'No such artwork.')
  return artworkDetail(db, actor, artwork)
})
