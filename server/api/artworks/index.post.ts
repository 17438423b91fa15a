import { artworkFieldsSchema } from '#shared/utils/schemas'

// multipart/form-data: file, title, teamId, widthMm (optional, default 150)
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const upload = await readUpload(event, artworkFieldsSchema)
  await requireRole(event, upload.fields.teamId, 'student')
  const created = await createArtwork(event, actor, { ...upload.fields, fileName: upload.fileName, bytes: upload.bytes })
  setResponseStatus(event, 201)
  return created
})
