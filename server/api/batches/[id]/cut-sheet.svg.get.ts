import { cutSheetQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findBatch } from '#server/batches/queries'
import { batchSheetFile } from '#server/batches/service'

// One sheet per file: ?sheet=N picks it (default 1); the batch page lists how many there are.
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'queue.work')
  const db = useDb()
  const batch = await findBatch(db, actor, idParam(event))
  if (!batch) throw createError({ statusCode: 404, message: 'No such batch.' })
  const { sheet = 1, ...options } = readQuery(event, cutSheetQuerySchema)
  return sendSheetFile(event, await batchSheetFile(db, actor, batch, options, 'svg', sheet), 'svg', sheet)
})
