import { cutSheetQuerySchema } from '#shared/utils/schemas'
import { batchDetail } from '#server/batches/service'

export default defineEventHandler(async (event) => {
  const { actor, db, batch } = await requireBatch(event)
  return batchDetail(db, actor, batch, readQuery(event, cutSheetQuerySchema))
})
