import { useDb } from '#server/platform/db'
import { findRevision } from '#server/artworks/queries'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const revision = authorize(actor, 'artwork.view', await findRevision(useDb(), actor, idParam(event)), 'No such revision.')
  return sendRevisionFile(event, revision, 'vector')
})
