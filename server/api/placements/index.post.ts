import { placementSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const input = await readJson(event, placementSchema)
  const placement = await createPlacement(event, actor, input)
  setResponseStatus(event, 201)
  return placement
})
