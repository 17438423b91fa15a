import { reprintSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const placementId = idParam(event)
  const input = await readJson(event, reprintSchema)
  setResponseStatus(event, 201)
  return requestReprint(event, actor, placementId, input)
})
