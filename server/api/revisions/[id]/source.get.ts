export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  return sendRevisionFile(event, await findRevision(actor, idParam(event)), 'source')
})
