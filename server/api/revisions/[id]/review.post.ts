import { reviewSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const revisionId = idParam(event)
  const input = await readJson(event, reviewSchema)
  await reviewRevision(event, actor, revisionId, input)
  return revisionDetail(await findRevision(actor, revisionId))
})
