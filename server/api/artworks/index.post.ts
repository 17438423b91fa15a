import { artworkFieldsSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { readUpload } from '#server/platform/uploads'
import { teamInScope } from '#server/people/queries'
import { createdArtwork, requestArtwork } from '#server/artworks/service'

// multipart/form-data: file, title, teamId, widthMm (optional, default 150)
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const upload = await readUpload(event, artworkFieldsSchema)
  const db = useDb()
  const team = authorize(actor, 'artwork.upload', await teamInScope(db, actor, upload.fields.teamId), 'No such team.')
  const workItemId = await idempotent(event, actor, () => requestArtwork(db, actor, team, { ...upload.fields, fileName: upload.fileName, bytes: upload.bytes, contentHash: upload.contentHash }))
  return answerWhenDone(event, actor, workItemId, (done) => createdArtwork(db, actor, done))
})
