import { batchCreateSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { createBatch } from '#server/batches/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  const { jobIds } = await readJson(event, batchCreateSchema)
  setResponseStatus(event, 201)
  return idempotent(event, actor, () => createBatch(useDb(), actor, jobIds))
})
