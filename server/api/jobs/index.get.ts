import { jobListQuerySchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  requireQueueWorker(actor)
  const parsed = jobListQuerySchema.safeParse(getQuery(event))
  if (!parsed.success) throw invalidInput(parsed.error)
  return listJobs(actor, parsed.data)
})
