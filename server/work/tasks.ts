// The queue's task list. A refusal (a picture that cannot become a decal, settings out of
// range: a 4xx) finishes the item as failed at once, with the answer the request would have
// given; anything else throws, so the queue tries again after a wait, and the last try
// finishes the item as failed.
import type { JobHelpers, TaskList } from 'graphile-worker'
import type { WorkError } from '#shared/types/work'
import type { Db } from '../platform/db'
import { inTransaction } from '../platform/db'
import { makeRevision } from '../artworks/service'
import { removeIfUnused } from '../artworks/objects'
import { BUILD_CUT_SHEET, buildSheetsForWork } from '../jobs/sheets'
import { beginWork, failWork, MAKE_REVISION, requeueWork } from './items'

/** A refusal's answer (an h3 error with a 4xx status), or undefined for any other failure. */
export function refusal(err: unknown): WorkError | undefined {
  const e = err as { statusCode?: unknown; message?: unknown; data?: unknown }
  if (typeof e?.statusCode !== 'number' || e.statusCode < 400 || e.statusCode >= 500 || e.statusCode === 499) return undefined
  return { status: e.statusCode, message: String(e.message ?? ''), ...(e.data === undefined ? {} : { data: e.data }) }
}

export const GAVE_UP: WorkError = { status: 500, message: 'The revision could not be made. Try again in a while, or tell a mentor if it keeps happening.' }

export async function runMakeRevision(db: Db, workItemId: number, helpers: Pick<JobHelpers, 'job'>): Promise<void> {
  const item = await beginWork(db, workItemId)
  if (!item) return // finished already, or cancelled
  try {
    await makeRevision(db, item)
  } catch (err) {
    const refused = refusal(err)
    const last = helpers.job.attempts >= helpers.job.max_attempts
    if (!refused && !last) {
      console.error(`[decalwright] work item ${item.id}, try ${helpers.job.attempts} of ${helpers.job.max_attempts}, failed and will be tried again:`, err instanceof Error ? err.stack ?? err.message : err)
      await requeueWork(db, item.id)
      throw err
    }
    // The item's outcome and, for an upload, the removal of its stored picture commit together:
    // whoever sees the refusal finds nothing left behind.
    await inTransaction(db, async (trx) => {
      await failWork(trx, item.id, refused ?? GAVE_UP)
      if (item.source_key) await removeIfUnused(trx, item.source_key)
    })
    if (!refused) throw err
  }
}

export const SHEET_GAVE_UP: WorkError = { status: 500, message: 'The cut sheet could not be built. Try again in a while, or tell a mentor if it keeps happening.' }

/** Builds the cut sheets a work item asks for; a refusal (copies that do not fit: 422) ends it at once, anything else is tried again. */
export async function runBuildCutSheet(db: Db, workItemId: number, helpers: Pick<JobHelpers, 'job'>): Promise<void> {
  const item = await beginWork(db, workItemId)
  if (!item) return
  try {
    await buildSheetsForWork(db, item)
  } catch (err) {
    const refused = refusal(err)
    if (!refused && helpers.job.attempts < helpers.job.max_attempts) {
      console.error(`[decalwright] cut sheet work item ${item.id}, try ${helpers.job.attempts}, failed and will be tried again:`, err instanceof Error ? err.message : err)
      await requeueWork(db, item.id)
      throw err
    }
    await failWork(db, item.id, refused ?? SHEET_GAVE_UP)
    if (!refused) throw err
  }
}

export function workTasks(db: () => Db): TaskList {
  return {
    [MAKE_REVISION]: async (payload, helpers) => {
      const id = Number((payload as { workItemId?: unknown } | null)?.workItemId)
      if (!Number.isInteger(id)) throw new Error('make-revision: the job names no work item')
      await runMakeRevision(db(), id, helpers)
    },
    [BUILD_CUT_SHEET]: async (payload, helpers) => {
      const id = Number((payload as { workItemId?: unknown } | null)?.workItemId)
      if (!Number.isInteger(id)) throw new Error(`${BUILD_CUT_SHEET}: the job names no work item`)
      await runBuildCutSheet(db(), id, helpers)
    },
  }
}
