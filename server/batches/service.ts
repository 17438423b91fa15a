// Batches: queued jobs in one film cut together on shared sheets. Made from the cut queue,
// cut as one (every job in it is marked cut, the sheets leave the shelf once), and a job can
// leave while it is still queued. The database keeps a batch to one film and one program and
// lets only queued jobs join (migration 0010); these functions say so in words first.
import { createError } from 'h3'
import type { z } from 'zod'
import type { BatchDetail, BatchList } from '#shared/types/robots'
import type { batchCutSchema } from '#shared/utils/schemas'
import { inTransaction, type Db } from '../platform/db'
import { flags, type Actor } from '../policy'
import { audit, by } from '../history/service'
import { notUsableBecause, takeSheets, toFilm } from '../films/service'
import { filmOfProgram } from '../films/queries'
import { findJobs, jobsOfBatch, type JobRow } from '../jobs/queries'
import { advance, countsCopies, cutEstimate, jobRef, jobViews, refusedFilm } from '../jobs/service'
import { DEFAULT_SHEET, defaultSheetCount, keptOrQueued, sheetLayout, type SheetAnswer, type SheetOptions } from '../jobs/sheets'
import { batchableJobs, findBatch, queuedBatches, type BatchRow } from './queries'

const iso = (t: Date | string | null) => (t ? new Date(t).toISOString() : null)

/** The queued batches and the batches worth making, for the cut queue. */
export async function listBatches(db: Db, actor: Actor): Promise<BatchList> {
  const [batches, groups] = await Promise.all([queuedBatches(db, actor.programId), batchableJobs(db, actor.programId)])
  return {
    batches: batches.map((b) => ({ id: b.id, filmId: b.film_id, filmName: b.film_name, state: b.state, jobIds: [...b.job_ids].sort((x, y) => x - y), copies: Number(b.copies), createdAt: iso(b.created_at)! })),
    suggestions: groups.map((g) => ({ filmId: g.film_id, filmName: g.film_name, jobIds: g.job_ids, copies: Number(g.copies) })),
  }
}

/** Why these jobs cannot be cut together, or null. */
function refusal(ids: number[], rows: JobRow[]): { status: number; message: string } | null {
  const found = new Set(rows.map((r) => r.job_id))
  const missing = ids.filter((id) => !found.has(id))
  if (missing.length) return { status: 404, message: `No such job: ${missing.join(', ')}.` }
  const notQueued = rows.filter((r) => r.state !== 'queued')
  if (notQueued.length) return { status: 409, message: `Only queued jobs join a batch: ${notQueued.map((r) => `job ${r.job_id} is ${r.state}`).join(', ')}.` }
  const inBatch = rows.filter((r) => r.batch_id !== null)
  if (inBatch.length) return { status: 409, message: `Already in a batch: ${inBatch.map((r) => `job ${r.job_id} (batch ${r.batch_id})`).join(', ')}. Take them out of it first.` }
  const films = new Set(rows.map((r) => r.film_id))
  if (films.size > 1) return { status: 422, message: 'A batch is cut from one film: these jobs are in different films. Filter the queue by film and choose again.' }
  return null
}

/** Makes a batch of queued jobs in one film. The caller has checked `queue.work`. */
export async function createBatch(db: Db, actor: Actor, ids: number[]): Promise<BatchDetail> {
  const rows = await findJobs(db, actor, ids)
  const no = refusal(ids, rows)
  if (no) throw createError({ statusCode: no.status, message: no.message })
  const filmId = rows[0]!.film_id
  const film = await filmOfProgram(db, actor.programId, filmId)
  const why = film && notUsableBecause(film)
  if (why) throw createError({ statusCode: 422, message: why })
  const id = await inTransaction(db, async (trx) => {
    const batch = await trx.insertInto('batch').values({ program_id: actor.programId, film_id: filmId, created_by: actor.id }).returning('id').executeTakeFirstOrThrow()
    const joined = await trx.updateTable('job').set({ batch_id: batch.id })
      .where('id', 'in', ids).where('state', '=', 'queued').where('batch_id', 'is', null).executeTakeFirst().catch(refusedFilm)
    if (Number(joined.numUpdatedRows) !== ids.length) throw createError({ statusCode: 409, message: 'Someone else moved one of these jobs just now. Reload the queue.' })
    for (const r of rows) await audit(trx, { ...by(actor), action: 'join-batch', subject: 'job', subjectId: r.job_id, detail: { ...jobRef(r), batchId: batch.id }, about: { robotId: r.robot_id } })
    return batch.id
  })
  return batchDetail(db, actor, (await findBatch(db, actor, id))!)
}

/** The batch's page: its jobs, the shared sheets, the film and the time it takes. */
export async function batchDetail(db: Db, actor: Actor, b: BatchRow, o: SheetOptions = DEFAULT_SHEET): Promise<BatchDetail> {
  const rows = await jobsOfBatch(db, actor, b.id)
  const [jobs, film, layout] = await Promise.all([jobViews(db, actor, rows), filmOfProgram(db, actor.programId, b.film_id), rows.length ? sheetLayout(rows, o) : null])
  const empty = { cutLengthMm: 0, estimate: { seconds: 0, text: 'no time', how: 'The batch has no jobs.' } }
  const noLayout = { fits: false, reason: 'The batch has no jobs.', method: 'packer' as const, sheets: 0, perSheet: 0, turned: false, usagePercent: 0, kerfMm: 0, copies: [] }
  const { cutLengthMm, estimate } = rows.length ? cutEstimate(rows) : empty
  return {
    id: b.id, state: b.state, createdAt: iso(b.created_at)!, createdBy: b.creator_name, cutAt: iso(b.cut_at), cutBy: b.cutter_name, sheetsUsed: b.sheets_used,
    film: toFilm(film!), jobs, copies: rows.reduce((n, r) => n + r.job_quantity, 0),
    layout: layout ?? noLayout,
    cutLengthMm, estimate,
    can: flags(actor, ['queue.work']),
  }
}

/** Marks every job of the batch cut; the sheets leave the shelf once. The caller has checked `queue.work`. */
export async function cutBatch(db: Db, actor: Actor, b: BatchRow, input: z.output<typeof batchCutSchema>): Promise<BatchDetail> {
  if (b.state !== 'queued') throw createError({ statusCode: 409, message: 'This batch is cut already.' })
  const rows = await jobsOfBatch(db, actor, b.id)
  if (rows.length === 0) throw createError({ statusCode: 409, message: 'This batch has no jobs left to cut.' })
  if (rows.some((r) => !r.film_cleared)) throw createError({ statusCode: 422, message: 'This film may not be cut. See the film\'s page.' })
  const sheets = input.sheetsUsed ?? await defaultSheetCount(rows)
  await inTransaction(db, async (trx) => {
    const now = new Date()
    const done = await trx.updateTable('batch').set({ state: 'cut', cut_by: actor.id, cut_at: now, sheets_used: sheets })
      .where('id', '=', b.id).where('state', '=', 'queued').executeTakeFirst()
    if (!done.numUpdatedRows) throw createError({ statusCode: 409, message: 'Someone else cut this batch just now. Reload the page.' })
    for (const r of rows) {
      await advance(trx, r, 'queued', { state: 'cut', cut_by: actor.id, cut_at: now, sheets_used: null })
      if (countsCopies(r)) await trx.updateTable('placement').set((eb) => ({ spares_on_hand: eb('spares_on_hand', '+', r.job_quantity) })).where('id', '=', r.placement_id).execute()
      await audit(trx, { ...by(actor), action: 'mark-cut', subject: 'job', subjectId: r.job_id, detail: { ...jobRef(r), batchId: b.id }, about: { robotId: r.robot_id } })
    }
    // One stock line for the shared sheets, against the batch's first job.
    await takeSheets(trx, actor, { filmId: b.film_id, sheets, jobId: rows[0]!.job_id, kind: 'cut' })
  })
  return batchDetail(db, actor, (await findBatch(db, actor, b.id))!)
}

/** Takes a queued job out of its batch. The caller has checked `queue.work`. */
export async function leaveBatch(db: Db, actor: Actor, b: BatchRow, jobId: number): Promise<BatchDetail> {
  const rows = await jobsOfBatch(db, actor, b.id)
  const r = rows.find((x) => x.job_id === jobId)
  if (!r) throw createError({ statusCode: 409, message: `Job ${jobId} is not in batch ${b.id}.` })
  if (r.state !== 'queued') throw createError({ statusCode: 409, message: `Job ${jobId} is ${r.state}: only a job not yet cut can leave its batch.` })
  await inTransaction(db, async (trx) => {
    const left = await trx.updateTable('job').set({ batch_id: null }).where('id', '=', jobId).where('batch_id', '=', b.id).where('state', '=', 'queued').executeTakeFirst()
    if (!left.numUpdatedRows) throw createError({ statusCode: 409, message: 'Someone else moved this job just now. Reload the page.' })
    await audit(trx, { ...by(actor), action: 'leave-batch', subject: 'job', subjectId: jobId, detail: { ...jobRef(r), batchId: b.id }, about: { robotId: r.robot_id } })
  })
  return batchDetail(db, actor, b)
}

/** One sheet of the batch's cut sheet, with the file's name. The caller has checked `queue.work`. */
export async function batchSheetFile(db: Db, actor: Actor, b: BatchRow, o: SheetOptions, format: 'svg' | 'dxf', sheet: number): Promise<SheetAnswer & { name: string }> {
  const rows = await jobsOfBatch(db, actor, b.id)
  if (rows.length === 0) throw createError({ statusCode: 409, message: 'This batch has no jobs.' })
  if (rows.some((r) => !r.film_cleared)) throw createError({ statusCode: 422, message: 'This film may not be cut. See the film\'s page.' })
  const answer = await keptOrQueued(db, actor, rows, o, format, sheet, { batchId: b.id })
  return { ...answer, name: `batch-${b.id}` }
}
