import { jobFailureSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findJob } from '#server/jobs/queries'
import { failJob } from '#server/jobs/service'

// A failed cut (burnt, lifted, mis-weeded): recorded, and a recut of the same revision queued.
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  const db = useDb()
  const job = authorize(actor, 'job.view', await findJob(db, actor, idParam(event)), 'No such job.')
  const input = await readJson(event, jobFailureSchema)
  return failJob(db, actor, job, input)
})
