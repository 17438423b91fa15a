// Work items: one row per piece of background work, which the person who asked for it (and a
// mentor) reads for its progress and result. The queued job that does the work is added in
// the same transaction as the row (server/platform/work-queue.ts).
import { sql, type Transaction } from 'kysely'
import type { Database } from '../db/schema'
import { WORK_PHASES, type SheetWorkResult, type WorkError, type WorkItemView, type WorkKind, type WorkPhase, type WorkResult } from '#shared/types/work'
import { inTransaction, type Db } from '../platform/db'
import { addJob, removeJob } from '../platform/work-queue'
import { canCancelWork, workScope, type Actor } from '../policy'

/** The one task the queue runs today: a revision of an artwork, the first (upload) or a later one. */
export const MAKE_REVISION = 'make-revision'

export interface NewWork {
  programId: number
  kind: WorkKind
  askedBy: number
  input: Record<string, unknown>
  /** A stored file the work will read and nothing else points at yet. */
  sourceKey?: string
  /** The queue's task that does the work (default: make-revision). */
  task?: string
}

// giveUpStrandedWork's SQL spells the same key.
const jobKey = (id: number) => `work-item-${id}`

/** Inserts the item and its queued job in the caller's transaction. */
export async function addWork(trx: Transaction<Database>, w: NewWork): Promise<number> {
  const { id } = await trx.insertInto('work_item').values({
    program_id: w.programId, kind: w.kind, asked_by: w.askedBy, input: JSON.stringify(w.input), source_key: w.sourceKey ?? null,
  }).returning('id').executeTakeFirstOrThrow()
  await addJob(trx, w.task ?? MAKE_REVISION, { workItemId: id }, { key: jobKey(id) })
  return id
}

const columns = ['id', 'program_id', 'kind', 'state', 'phase', 'percent', 'attempts', 'result', 'error', 'asked_by', 'created_at', 'finished_at'] as const
type ItemRow = Awaited<ReturnType<typeof readItem>>

function readItem(db: Db, id: number) {
  return db.selectFrom('work_item').select(columns).where('id', '=', id).executeTakeFirst()
}

export function toView(actor: Actor, r: NonNullable<ItemRow>): WorkItemView {
  return {
    id: r.id, kind: r.kind, state: r.state, phase: r.phase, percent: r.percent, attempts: r.attempts,
    result: r.result, error: r.error,
    createdAt: new Date(r.created_at).toISOString(), finishedAt: r.finished_at ? new Date(r.finished_at).toISOString() : null,
    can: { cancel: r.state === 'queued' && canCancelWork(actor, { programId: r.program_id, askedBy: r.asked_by }) },
  }
}

/** The item, if the actor may follow it (the policy's scope in SQL). */
export async function findWork(db: Db, actor: Actor, id: number): Promise<WorkItemView | undefined> {
  const row = await db.selectFrom('work_item').select(columns).where('id', '=', id).where(workScope(actor)).executeTakeFirst()
  return row && toView(actor, row)
}

/**
 * Waits until the item is finished or `timeoutMs` has passed, reading its row every
 * `intervalMs`, and returns it as it then is.
 */
export async function waitForWork(db: Db, actor: Actor, id: number, o: { timeoutMs: number; intervalMs?: number }): Promise<WorkItemView> {
  const deadline = Date.now() + o.timeoutMs
  for (;;) {
    const row = await readItem(db, id)
    if (!row) throw new Error(`work item ${id} is gone`)
    if (row.state === 'done' || row.state === 'failed' || Date.now() >= deadline) return toView(actor, row)
    await new Promise((r) => setTimeout(r, Math.min(o.intervalMs ?? 100, Math.max(0, deadline - Date.now()))))
  }
}

/** The item's row for the runner: state running and one more attempt, unless it is finished (or cancelled). */
export async function beginWork(db: Db, id: number) {
  return db.updateTable('work_item')
    .set({ state: 'running', attempts: sql<number>`attempts + 1`, started_at: sql<Date>`coalesce(started_at, now())`, updated_at: new Date(), ...phase('reading') })
    .where('id', '=', id).where('state', 'in', ['queued', 'running'])
    .returning(['id', 'program_id', 'kind', 'input', 'source_key', 'asked_by', 'attempts']).executeTakeFirst()
}
export type BegunWork = NonNullable<Awaited<ReturnType<typeof beginWork>>>

function phase(p: WorkPhase) {
  return { phase: p, percent: WORK_PHASES[p].percent }
}

export async function reportPhase(db: Db, id: number, p: WorkPhase): Promise<void> {
  await db.updateTable('work_item').set({ ...phase(p), updated_at: new Date() }).where('id', '=', id).where('state', '=', 'running').execute()
}

/** In the transaction that writes the work's rows. */
export async function finishWork(trx: Transaction<Database>, id: number, result: WorkResult | SheetWorkResult): Promise<void> {
  await trx.updateTable('work_item')
    .set({ state: 'done', result: JSON.stringify(result), finished_at: new Date(), updated_at: new Date(), ...phase('finished') })
    .where('id', '=', id).execute()
}

export async function failWork(db: Db, id: number, error: WorkError): Promise<void> {
  await db.updateTable('work_item').set({ state: 'failed', error: JSON.stringify(error), finished_at: new Date(), updated_at: new Date() })
    .where('id', '=', id).where('state', 'in', ['queued', 'running']).execute()
}

/** Back to waiting after a failed try that will be tried again. */
export async function requeueWork(db: Db, id: number): Promise<void> {
  await db.updateTable('work_item').set({ ...phase('waiting'), updated_at: new Date() }).where('id', '=', id).where('state', '=', 'running').execute()
}

export const CANCELLED: WorkError = { status: 409, message: 'This was cancelled before it started.', data: { cancelled: true } }

/**
 * Cancels a queued item of the actor's: the row is marked failed and its job removed in one
 * transaction. A runner that took the job meanwhile finds the item finished and does nothing.
 * Returns false when the item has already started or finished.
 */
export async function cancelWork(db: Db, id: number): Promise<boolean> {
  return inTransaction(db, async (trx) => {
    const r = await trx.updateTable('work_item')
      .set({ state: 'failed', error: JSON.stringify(CANCELLED), finished_at: new Date(), updated_at: new Date() })
      .where('id', '=', id).where('state', '=', 'queued').returning('id').executeTakeFirst()
    if (r) await removeJob(trx, jobKey(id))
    return !!r
  })
}

/**
 * Gives up work whose job can never run again: a runner killed on the job's last try leaves it
 * unlocked (once its runner is found dead) with no tries left, so no runner takes it and the
 * person who asked would wait for ever. Run after dead runners are released.
 */
export const STRANDED: WorkError = { status: 500, message: 'This stopped when the process doing it was interrupted on its last try. Try again, or tell a mentor if it keeps happening.' }

export async function giveUpStrandedWork(db: Db, error: WorkError = STRANDED): Promise<number[]> {
  const r = await sql<{ id: number }>`update work_item w
    set state = 'failed', error = ${JSON.stringify(error)}::jsonb, finished_at = now(), updated_at = now()
    where w.state = 'running' and not exists (
      select 1 from graphile_worker.jobs j
      where j.key = 'work-item-' || w.id and (j.locked_at is not null or j.attempts < j.max_attempts))
    returning w.id`.execute(db)
  return r.rows.map((row) => row.id)
}
