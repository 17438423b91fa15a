import { jobListQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { listJobs } from '#server/jobs/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  const query = readQuery(event, jobListQuerySchema)
  return listJobs(useDb(), actor, query)
})
