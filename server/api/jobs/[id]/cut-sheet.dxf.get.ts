import { cutSheetQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findJob } from '#server/jobs/queries'
import { jobSheetFile } from '#server/jobs/service'

// One sheet per file: ?sheet=N picks it (default 1); the job page lists how many there are.
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  const db = useDb()
  const job = authorize(actor, 'job.view', await findJob(db, actor, idParam(event)), 'No such job.')
  const { sheet = 1, ...options } = readQuery(event, cutSheetQuerySchema)
  return answerSheet(event, actor, () => jobSheetFile(db, actor, job, options, 'dxf', sheet), 'dxf', sheet)
})
