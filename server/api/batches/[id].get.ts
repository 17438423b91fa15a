import { cutSheetQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findBatch } from '#server/batches/queries'
import { batchDetail } from '#server/batches/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  const db = useDb()
  const batch = await findBatch(db, actor, idParam(event))
  if (!batch) throw createError({ statusCode: 404, message: 'No such batch.' })
  return batchDetail(db, actor, batch, readQuery(event, cutSheetQuerySchema))
})
