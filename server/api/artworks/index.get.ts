import { artworkListQuerySchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const parsed = artworkListQuerySchema.safeParse(getQuery(event))
  if (!parsed.success) throw invalidInput(parsed.error)
  return listArtworks(actor, parsed.data)
})
