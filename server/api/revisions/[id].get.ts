export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  return revisionDetail(await findRevision(actor, idParam(event)))
})
