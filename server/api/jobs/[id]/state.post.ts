import { jobStateSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findJob } from '#server/jobs/queries'
import { moveJob } from '#server/jobs/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  const db = useDb()
  const job = authorize(actor, 'job.view', await findJob(db, actor, idParam(event)), 'No such job.')
  const input = await readJson(event, jobStateSchema)
  return moveJob(db, actor, job, input)
})
