import { useDb } from '#server/platform/db'
import { findBatch } from '#server/batches/queries'
import { leaveBatch } from '#server/batches/service'

// A queued job leaves its batch (and is cut on its own, or in another batch).
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  const db = useDb()
  const batch = await findBatch(db, actor, idParam(event))
  if (!batch) throw createError({ statusCode: 404, message: 'No such batch.' })
  return leaveBatch(db, actor, batch, idParam(event, 'jobId'))
})
