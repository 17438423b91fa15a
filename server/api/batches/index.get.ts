import { useDb } from '#server/platform/db'
import { listBatches } from '#server/batches/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  return listBatches(useDb(), actor)
})
