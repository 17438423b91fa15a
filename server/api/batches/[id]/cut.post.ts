import { batchCutSchema } from '#shared/utils/schemas'
import { cutBatch } from '#server/batches/service'

// Every job in the batch is marked cut; the shared sheets leave the shelf once.
export default defineEventHandler(async (event) => {
  const { actor, db, batch } = await requireBatch(event)
  const input = await readJson(event, batchCutSchema)
  return cutBatch(db, actor, batch, input)
})
