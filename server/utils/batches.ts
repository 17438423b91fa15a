// Route glue for batches: the guard and lookup every batch route starts with, and the sheet
// downloads (the same route in two formats). Auto-imported into routes.
import { createError, defineEventHandler, type H3Event } from 'h3'
import { cutSheetQuerySchema } from '#shared/utils/schemas'
import { useDb } from '../platform/db'
import { findBatch } from '../batches/queries'
import { batchSheetFile } from '../batches/service'
import { requireCan } from './actor'
import { answerSheet } from './cut-sheets'
import { idParam, readQuery } from './request'

/** Batches are the cut queue's work: 401/403 by the policy, then 404 for another program's. */
export async function requireBatch(event: H3Event) {
  const actor = await requireCan(event, 'queue.work')
  const db = useDb()
  const batch = await findBatch(db, actor, idParam(event))
  if (!batch) throw createError({ statusCode: 404, message: 'No such batch.' })
  return { actor, db, batch }
}

/** GET a batch's sheet N (?sheet=N, default 1) in one format, with the sheet options in the query; 202 while it is built. */
export function batchSheetHandler(format: 'svg' | 'dxf') {
  return defineEventHandler(async (event) => {
    const { actor, db, batch } = await requireBatch(event)
    const { sheet = 1, ...options } = readQuery(event, cutSheetQuerySchema)
    return answerSheet(event, actor, () => batchSheetFile(db, actor, batch, options, format, sheet), format, sheet)
  })
}
