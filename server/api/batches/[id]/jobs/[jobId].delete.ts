import { leaveBatch } from '#server/batches/service'

// A queued job leaves its batch (and is cut on its own, or in another batch).
export default defineEventHandler(async (event) => {
  const { actor, db, batch } = await requireBatch(event)
  return leaveBatch(db, actor, batch, idParam(event, 'jobId'))
})
