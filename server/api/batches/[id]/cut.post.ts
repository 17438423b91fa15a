import { batchCutSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findBatch } from '#server/batches/queries'
import { cutBatch } from '#server/batches/service'

// Every job in the batch is marked cut; the shared sheets leave the shelf once.
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  const db = useDb()
  const batch = await findBatch(db, actor, idParam(event))
  if (!batch) throw createError({ statusCode: 404, message: 'No such batch.' })
  const input = await readJson(event, batchCutSchema)
  return cutBatch(db, actor, batch, input)
})
