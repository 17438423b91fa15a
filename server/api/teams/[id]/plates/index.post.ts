import { plateRequestSchema } from '#shared/plates/schemas'
import { useDb } from '#server/platform/db'
import { teamInScope } from '#server/people/queries'
import { createPlateArtworks } from '#server/plates/artworks'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const team = authorize(actor, 'artwork.upload', await teamInScope(db, actor, idParam(event)), 'No such team.')
  const input = await readJson(event, plateRequestSchema)
  const created = await idempotent(event, actor, () => createPlateArtworks(db, actor, team, input))
  setResponseStatus(event, 201)
  return created
})
