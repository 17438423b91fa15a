export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const revisionId = idParam(event)
  await submitRevision(event, actor, revisionId)
  return revisionDetail(await findRevision(actor, revisionId))
})
