import { plateRequestSchema } from '#shared/plates/schemas'
import { useDb } from '#server/platform/db'
import { teamInScope } from '#server/people/queries'
import { previewPlate } from '#server/plates/artworks'

// The plate as it would be made; nothing is stored.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const team = authorize(actor, 'artwork.upload', await teamInScope(db, actor, idParam(event)), 'No such team.')
  const input = await readJson(event, plateRequestSchema)
  return previewPlate(db, actor, team, input)
})
