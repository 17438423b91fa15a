import { jobCancelSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findJob } from '#server/jobs/queries'
import { cancelJob } from '#server/jobs/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  const db = useDb()
  const job = authorize(actor, 'job.view', await findJob(db, actor, idParam(event)), 'No such job.')
  const { reason } = await readJson(event, jobCancelSchema)
  return cancelJob(db, actor, job, reason)
})
