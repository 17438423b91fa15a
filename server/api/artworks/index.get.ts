import { artworkListQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { listArtworks } from '#server/artworks/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const query = readQuery(event, artworkListQuerySchema)
  return listArtworks(useDb(), actor, query)
})
