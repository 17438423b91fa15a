import { cutSheetQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findJob } from '#server/jobs/queries'
import { jobDetail } from '#server/jobs/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const job = authorize(actor, 'job.view', await findJob(db, actor, idParam(event)), 'No such job.')
  const options = readQuery(event, cutSheetQuerySchema)
  return jobDetail(db, actor, job, options)
})
