import { revisionRequestSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const artworkId = idParam(event)
  const input = await readJson(event, revisionRequestSchema)
  const revision = await createRevision(event, actor, artworkId, input)
  setResponseStatus(event, 201)
  return revision
})
