export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  return artworkDetail(actor, idParam(event))
})
