// The route helper for cut sheet downloads: a kept sheet is sent at once; otherwise its set is
// being built as a work item, which the request waits for (up to NUXT_WORK_WAIT_MS, or not at
// all when it says `Prefer: respond-async`, RFC 7240) before sending the sheet, or answers 202
// with the item and where to follow it.
import { createError, getRequestHeader, setResponseHeader, setResponseStatus, type H3Event } from 'h3'
import type { WorkAccepted } from '#shared/types/work'
import { useDb } from '../platform/db'
import type { SheetAnswer } from '../jobs/sheets'
import { findWork, waitForWork } from '../work/items'
import type { Actor } from '../policy'
import { sendSheetFile } from './downloads'

export async function answerSheet(event: H3Event, actor: Actor, ask: () => Promise<SheetAnswer & { name: string }>, format: 'svg' | 'dxf', sheet: number): Promise<Buffer | WorkAccepted> {
  const first = await ask()
  if (first.file) return sendSheetFile(event, { ...first.file, name: first.name }, format, sheet)
  const db = useDb()
  const respondAsync = /\brespond-async\b/i.test(getRequestHeader(event, 'prefer') ?? '')
  const item = await waitForWork(db, actor, first.workItemId, { timeoutMs: respondAsync ? 0 : Number(useRuntimeConfig().workWaitMs) || 60_000 })
  if (item.state === 'failed' && item.error) {
    throw createError({ statusCode: item.error.status, message: item.error.message, ...(item.error.data === undefined ? {} : { data: item.error.data }) })
  }
  // Built for this request (or the jobs changed meanwhile, and another build is under way).
  const then = item.state === 'done' ? await ask() : first
  if (then.file) return sendSheetFile(event, { ...then.file, fromStore: false, name: then.name }, format, sheet)
  setResponseStatus(event, 202)
  setResponseHeader(event, 'location', `/api/work/${then.workItemId}`)
  return { workItem: then.workItemId === item.id ? item : (await findWork(db, actor, then.workItemId))! }
}
