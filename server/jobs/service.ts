// The cut queue: jobs from placements, reprints, recuts and edits; their cut sheets; and
// queued → cut → applied, or queued → cancelled, or a failed cut that queues a recut.
import { createError } from 'h3'
import type { Transaction, Updateable } from 'kysely'
import { z } from 'zod'
import type { Database, JobTable } from '../db/schema'
import type { Page } from '#shared/types/api'
import type { Film } from '#shared/types/films'
import type { JobDetail, JobKind, JobStock, JobView } from '#shared/types/robots'
import { CUT_FAILURE_LABELS } from '#shared/types/robots'
import type { jobFailureSchema, jobStateSchema } from '#shared/utils/schemas'
import { cutPerCopy, estimateCutSeconds, formatDuration, MOVE_ALLOWANCE_S, type MarksCut } from '#shared/utils/cut-time'
import { defaultMarksCut } from '../pipeline/colour/mark-shape'
import { forecastSheets } from '#shared/films/stock'
import { decodeCursor, pageOf } from '../platform/cursor'
import { inTransaction, type Db } from '../platform/db'
import { absoluteUrl, queueMail } from '../platform/mail'
import { fileSlug } from '../platform/file-names'
import { fieldError } from '../platform/http'
import { flags, type Actor } from '../policy'
import { audit, by, historyOf } from '../history/service'
import { newJobMail, newJobsMail, type ListedJob } from '../mail/templates'
import { notUsableBecause, takeSheets, toFilm } from '../films/service'
import { filmOfProgram, filmsOfProgram } from '../films/queries'
import { DEFAULT_SHEET, defaultSheetCount, keptOrQueued, sheetLayout, type SheetAnswer, type SheetOptions } from './sheets'
import { findJob, jobPage, layerFilmsOfPlacement, operatorEmails, queuedSheetInputs, type JobFilter, type JobRow } from './queries'

export interface NewJob {
  placementId: number
  filmId: number
  kind: JobKind
  quantity: number
  /** The width the copies are cut at. */
  widthMm: number
  reason: string
  /** The failed job a recut replaces. */
  recutOf?: number
  /** Of a layered decal: only this layer (a damaged layer's reprint, a recut); every layer when left out. */
  layer?: number
  /** The order a recut joins (its failed job's); a new order when left out. */
  orderId?: number
  /** What the job is for, for the history and the operators' mail. */
  teamId: number
  robotId: number
  robotName: string
  title: string
  spot: string
}

const QUEUE_ACTION = { initial: 'queue-job', reprint: 'reprint', recut: 'recut', extra: 'queue-extra' } as const

/** The database refuses a job on film that may not be cut (the film_cleared key): said in words. */
export function refusedFilm(err: unknown): never {
  const e = err as { code?: string; constraint?: string; message?: string }
  if ((e.code === '23503' && /_film_cleared$/.test(e.constraint ?? '')) || /film_cleared/.test(e.message ?? '')) {
    throw createError({ statusCode: 422, message: 'This film may not be cut: its polymer is never allowed, or needs the lab\'s approval first. See the film\'s page.' })
  }
  throw err
}

/** A job just queued, with what the operators' mail says of it. */
interface QueuedJob { id: number; title: string; film: string; layer: ListedJob['layer'] }

/** One cut just queued: what was asked, and its jobs (one per layer of a layered decal). */
interface QueuedCut { cut: NewJob; jobs: QueuedJob[] }

/**
 * Queues a cut, writes its history lines and mails the operators once, all in the caller's
 * transaction: every query here goes through `trx`, never a second pool connection. For a
 * layered decal the cut is one order of one job per layer (or of the one layer asked for),
 * each in its layer's film; the answer is the jobs' ids, bottom layer first.
 */
export async function queueJobs(trx: Transaction<Database>, actor: Actor, o: NewJob): Promise<number[]> {
  return (await queueCuts(trx, actor, [o]))[0]!
}

/**
 * Several cuts queued by one change (the event kit's reprints), each as queueJobs queues it,
 * with one mail to each team's operators listing every job: one message per change, however
 * many layers and decals it queues. The answer is each cut's jobs' ids, in the order asked.
 */
export async function queueCuts(trx: Transaction<Database>, actor: Actor, cuts: NewJob[]): Promise<number[][]> {
  const queued: QueuedCut[] = []
  for (const o of cuts) queued.push(await insertCut(trx, actor, o))
  for (const teamId of new Set(cuts.map((c) => c.teamId))) {
    await mailOperators(trx, actor, teamId, queued.filter((q) => q.cut.teamId === teamId))
  }
  return queued.map((q) => q.jobs.map((j) => j.id))
}

async function insertCut(trx: Transaction<Database>, actor: Actor, o: NewJob): Promise<QueuedCut> {
  const layers = await layerFilmsOfPlacement(trx, o.placementId)
  if (layers.length === 0) {
    const film = await trx.selectFrom('film').select('name').where('id', '=', o.filmId).executeTakeFirst()
    return { cut: o, jobs: [{ id: await insertJob(trx, actor, o, null), title: o.title, film: film?.name ?? '', layer: null }] }
  }
  const cut = o.layer === undefined ? layers : layers.filter((l) => l.position === o.layer)
  if (cut.length === 0) throw fieldError(400, `This decal has ${layers.length} layers: choose one of them.`, 'layer')
  // The database refuses a film that is not cleared; a retired one is refused here, for every caller.
  const blocked = cut.find((l) => !l.film_cleared || l.film_retired)
  if (blocked) {
    throw createError({ statusCode: 422, message: `“${o.title}” has layer ${blocked.position + 1} (${blocked.name}) placed in ${blocked.film_name}, which may not be cut now: place it again in another film.` })
  }
  const orderId = o.orderId ?? (await trx.insertInto('job_order').values({ placement_id: o.placementId, created_by: actor.id }).returning('id').executeTakeFirstOrThrow()).id
  const jobs: QueuedJob[] = []
  for (const l of cut) {
    const title = `${o.title} (layer ${l.position + 1} of ${layers.length}: ${l.name}, in ${l.film_name})`
    const id = await insertJob(trx, actor, { ...o, filmId: l.film_id }, { layer: l.position, orderId, title })
    jobs.push({ id, title, film: l.film_name, layer: { position: l.position, count: layers.length, name: l.name } })
  }
  return { cut: o, jobs }
}

/** One job of queueJobs: the first (a one-colour decal's only) job's id. */
export async function queueJob(trx: Transaction<Database>, actor: Actor, o: NewJob): Promise<number> {
  return (await queueJobs(trx, actor, o))[0]!
}

async function insertJob(trx: Transaction<Database>, actor: Actor, o: NewJob, layer: { layer: number; orderId: number; title: string } | null): Promise<number> {
  const job = await trx.insertInto('job').values({
    placement_id: o.placementId, kind: o.kind, quantity: o.quantity, reason: o.reason, film_id: o.filmId, width_mm: o.widthMm,
    recut_of: o.recutOf ?? null, created_by: actor.id, layer: layer?.layer ?? null, order_id: layer?.orderId ?? null,
  }).returning('id').executeTakeFirstOrThrow().catch(refusedFilm)
  const ref = { title: layer?.title ?? o.title, robot: o.robotName, spot: o.spot, quantity: o.quantity, reason: o.reason }
  const about = { robotId: o.robotId }
  if (o.kind === 'recut') await audit(trx, { ...by(actor), action: 'recut', subject: 'job', subjectId: job.id, detail: { ...ref, recutOf: o.recutOf! }, about })
  else await audit(trx, { ...by(actor), action: QUEUE_ACTION[o.kind], subject: 'job', subjectId: job.id, detail: ref, about })
  return job.id
}

/**
 * The mail to a team's operators for what one change queued: a single job as it always was;
 * several (a layered decal's layers, an event kit) in one message listing each with its link.
 */
async function mailOperators(trx: Transaction<Database>, actor: Actor, teamId: number, queued: QueuedCut[]) {
  const to = await operatorEmails(trx, actor.programId, teamId)
  const url = (id: number) => absoluteUrl(`/lab/jobs/${id}`)
  const jobs = queued.flatMap((q) => q.jobs.map((j) => ({ ...j, cut: q.cut })))
  if (jobs.length === 0) return
  if (jobs.length === 1) {
    const { cut: o, ...j } = jobs[0]!
    await queueMail(trx, actor.programId, newJobMail({ to, kind: o.kind, title: j.title, robot: o.robotName, spot: o.spot, quantity: o.quantity, reason: o.reason, by: actor.name, url: url(j.id) }))
    return
  }
  const kinds = new Set(jobs.map((j) => j.cut.kind)), reasons = new Set(jobs.map((j) => j.cut.reason))
  await queueMail(trx, actor.programId, newJobsMail({
    to, kind: kinds.size === 1 ? jobs[0]!.cut.kind : 'initial', by: actor.name, reason: reasons.size === 1 ? jobs[0]!.cut.reason : '',
    jobs: jobs.map((j) => ({ title: j.cut.title, robot: j.cut.robotName, spot: j.cut.spot, quantity: j.cut.quantity, film: j.film, layer: j.layer, url: url(j.id) })),
  }))
}

const iso = (t: Date | string | null) => (t ? new Date(t).toISOString() : null)
const copyHeight = (r: Pick<JobRow, 'job_width' | 'revision_width' | 'revision_height'>) => (r.job_width * r.revision_height) / r.revision_width

function toView(r: JobRow, film: Film, stock: JobStock | null): JobView {
  return {
    id: r.job_id, kind: r.kind, quantity: r.job_quantity, reason: r.reason, state: r.state,
    createdAt: iso(r.job_created_at)!, createdBy: r.creator_name,
    cutAt: iso(r.cut_at), cutBy: r.cutter_name, sheetsUsed: r.sheets_used,
    appliedAt: iso(r.applied_at), appliedBy: r.applier_name, appliedCount: r.applied_count,
    cancelledAt: iso(r.cancelled_at), cancelledBy: r.canceller_name, cancelReason: r.cancel_reason,
    failedAt: iso(r.failed_at), failedBy: r.failer_name, failure: r.failure, failureNote: r.failure_note,
    recutOf: r.recut_of, recutBy: r.recut_by,
    placement: {
      id: r.placement_id, spot: r.spot, widthMm: r.job_width, heightMm: copyHeight(r), quantity: r.placement_quantity,
      sparesOnHand: r.spares_on_hand, removed: r.removed_at !== null,
    },
    robot: { id: r.robot_id, name: r.robot_name, season: r.season },
    team: { id: r.teamId, name: r.team_name, colour: r.team_colour },
    revision: { id: r.revision_id, number: r.revision_number, artworkId: r.artwork_id, title: r.title, vectorUrl: `/api/revisions/${r.revision_id}/vector.svg` },
    layer: r.layer === null || r.order_id === null ? null : {
      position: r.layer, count: r.layer_count, name: r.layer_name ?? '', hex: r.layer_hex ?? '#000000', orderId: r.order_id, order: r.order_jobs,
      layers: r.revision_layers.map((l) => ({ ...l, vectorUrl: `/api/jobs/${r.job_id}/layers/${l.position}/vector.svg` })),
    },
    film,
    stock,
    batchId: r.batch_id,
  }
}

/** Every queued job's sheets against the shelf, in queue order. */
export async function stockForecast(db: Db, programId: number): Promise<Map<number, JobStock>> {
  const rows = await queuedSheetInputs(db, programId)
  const onHand = new Map(rows.map((r) => [r.film_id, r.sheets_on_hand]))
  return forecastSheets(rows.map((r) => ({
    id: r.id, filmId: r.film_id, copies: r.quantity, copyWidthMm: r.width_mm, copyHeightMm: (r.width_mm * r.revision_height) / r.revision_width,
    sheetWidthMm: r.sheet_width_mm, sheetHeightMm: r.sheet_height_mm,
  })), onHand)
}

const queueCursor = z.object({ rank: z.number().int().min(0).max(1), key: z.number().int() })

/** The cut queue, a page at a time, each queued job with its sheets against the shelf. */
export async function listJobs(db: Db, actor: Actor, o: JobFilter & { cursor?: string; limit: number }): Promise<Page<JobView>> {
  const [rows, films, stock] = await Promise.all([
    jobPage(db, actor, o, decodeCursor(o.cursor, queueCursor), o.limit + 1),
    filmsOfProgram(db, actor.programId),
    stockForecast(db, actor.programId),
  ])
  const byId = new Map(films.map((f) => [f.id, toFilm(f)]))
  return pageOf(rows, o.limit, (r) => toView(r, byId.get(r.film_id)!, stock.get(r.job_id) ?? null), (r) => ({ rank: r.order_rank, key: r.order_key }))
}

/** The jobs' views, each with its film and, while queued, its sheets against the shelf. */
export async function jobViews(db: Db, actor: Actor, rows: JobRow[]): Promise<JobView[]> {
  const [films, stock] = await Promise.all([filmsOfProgram(db, actor.programId), stockForecast(db, actor.programId)])
  const byId = new Map(films.map((f) => [f.id, toFilm(f)]))
  return rows.map((r) => toView(r, byId.get(r.film_id)!, stock.get(r.job_id) ?? null))
}

/**
 * The registration marks a job cuts beside each copy: none for a one-colour decal; for a
 * layer, as measured with it, or the default marks for a layer stored before they were.
 */
export function marksOfJob(r: Pick<JobRow, 'layer' | 'measurements' | 'stored_mark_count'>): MarksCut | null {
  if (r.layer === null) return null
  return r.measurements.marks ?? (r.stored_mark_count > 0 ? defaultMarksCut(r.stored_mark_count) : null)
}

/** Cut length and time of every copy of these jobs, all in one film: a layer's registration marks included. */
export function cutEstimate(rows: JobRow[]) {
  const first = rows[0]!
  let cutLengthMm = 0, outlines = 0, marksMm = 0
  for (const r of rows) {
    const scale = r.job_width / r.revision_width
    const marks = marksOfJob(r)
    const copy = cutPerCopy(r.measurements, marks)
    cutLengthMm += copy.cutLengthMm * scale * r.job_quantity
    outlines += copy.outlines * r.job_quantity
    marksMm += (marks?.cutLengthMm ?? 0) * scale * r.job_quantity
  }
  const { laser_speed_mm_s: speed, laser_passes: passes } = first
  const seconds = estimateCutSeconds({ cutLengthMm, pieces: outlines, speedMmS: speed, passes })
  return {
    cutLengthMm,
    estimate: {
      seconds, text: formatDuration(seconds),
      how: `Cut length ${Math.round(cutLengthMm)} mm${marksMm > 0 ? ` (the registration marks' ${Math.round(marksMm)} mm included)` : ''} × ${passes} pass${passes === 1 ? '' : 'es'} ÷ ${speed} mm/s, plus ${MOVE_ALLOWANCE_S} s per outline per pass for the moves between them.`,
    },
  }
}

/** The job's page. The caller has found the job in the actor's scope. */
export async function jobDetail(db: Db, actor: Actor, r: JobRow, o: SheetOptions = DEFAULT_SHEET): Promise<JobDetail> {
  const { cutLengthMm, estimate } = cutEstimate([r])
  const [layout, history, film, stock] = await Promise.all([
    sheetLayout([r], o),
    historyOf(db, actor, { jobId: r.job_id }),
    filmOfProgram(db, actor.programId, r.film_id),
    r.state === 'queued' ? stockForecast(db, actor.programId) : Promise.resolve(new Map<number, JobStock>()),
  ])
  return {
    ...toView(r, toFilm(film!), stock.get(r.job_id) ?? null),
    layout,
    // Per copy: the page multiplies by the quantity.
    cutLengthMm: cutLengthMm / r.job_quantity, pieces: r.measurements.pieces,
    estimate,
    history: history.map((h) => ({ at: h.at, action: h.action, by: h.by, detail: h.detail })),
    can: flags(actor, ['queue.work'], r),
  }
}

/** What the history says about a job. */
export type JobNames = Pick<JobRow, 'job_id' | 'robot_id' | 'title' | 'robot_name' | 'spot' | 'job_quantity'>
export const jobRef = (r: JobNames) => ({ title: r.title, robot: r.robot_name, spot: r.spot, quantity: r.job_quantity })

/** Moves the job from `from` in one statement, so two people at once cannot both move it. */
export async function advance(trx: Transaction<Database>, r: Pick<JobRow, 'job_id'>, from: JobRow['state'], set: Updateable<JobTable>) {
  const done = await trx.updateTable('job').set(set).where('id', '=', r.job_id).where('state', '=', from).executeTakeFirst()
  if (!done.numUpdatedRows) throw createError({ statusCode: 409, message: 'Someone else moved this job just now. Reload the page.' })
}

/**
 * Whether a job's copies count as decals on hand: a one-colour job's do; of a layered decal,
 * only its bottom layer's (the layers above are laid on it, so the bottom layer's copies count
 * the decals, and a failed upper layer's recut restores the stack without counting twice).
 */
export const countsCopies = (r: Pick<JobRow, 'layer'>) => r.layer === null || r.layer === 0

/** How many copies of a job go on the robot unless the operator says otherwise: the placement's count for its first cut, all of them otherwise. */
function defaultApplied(r: JobRow): number {
  return Math.min(r.job_quantity, r.kind === 'initial' ? r.placement_quantity : r.job_quantity)
}

/**
 * queued → cut (the sheets it used leave the shelf; its copies join the cut copies on hand) →
 * applied (how many went on the robot leave the copies on hand; the rest stay as spares). The
 * caller has checked `queue.work`.
 */
export async function moveJob(db: Db, actor: Actor, r: JobRow, input: z.output<typeof jobStateSchema>): Promise<JobDetail> {
  const to = input.state
  const from = r.state
  if (to === 'cut') inNoBatch(r)
  if ((to === 'cut' && from !== 'queued') || (to === 'applied' && from !== 'cut')) {
    throw createError({ statusCode: 409, message: to === 'cut' ? `This job is ${from} already.` : 'A job is applied after it is cut.' })
  }
  // Laid out before the transaction: the pool's answer never holds a connection.
  const cutSheets = to === 'cut' ? input.sheetsUsed ?? await defaultSheetCount([r]) : 0
  const moved = await inTransaction(db, async (trx) => {
    if (to === 'cut') {
      if (!r.film_cleared) throw createError({ statusCode: 422, message: 'This film may not be cut. See the film\'s page.' })
      const sheets = cutSheets
      await advance(trx, r, from, { state: 'cut', cut_by: actor.id, cut_at: new Date(), sheets_used: sheets })
      await takeSheets(trx, actor, { filmId: r.film_id, sheets, jobId: r.job_id, kind: 'cut' })
      if (countsCopies(r)) await trx.updateTable('placement').set((eb) => ({ spares_on_hand: eb('spares_on_hand', '+', r.job_quantity) })).where('id', '=', r.placement_id).execute()
      await audit(trx, { ...by(actor), action: 'mark-cut', subject: 'job', subjectId: r.job_id, detail: { ...jobRef(r), sheets }, about: { robotId: r.robot_id } })
    } else {
      const counts = countsCopies(r)
      const applied = input.applied ?? (counts ? Math.min(defaultApplied(r), r.spares_on_hand) : defaultApplied(r))
      if (applied > r.job_quantity) throw fieldError(400, `This job cut ${r.job_quantity}: at most that many can go on the robot from it.`, 'applied')
      const taken = counts
        ? await trx.updateTable('placement').set((eb) => ({ spares_on_hand: eb('spares_on_hand', '-', applied) }))
            .where('id', '=', r.placement_id).where('spares_on_hand', '>=', applied).executeTakeFirst()
        : { numUpdatedRows: 1n }
      if (!taken.numUpdatedRows) throw fieldError(409, `Only ${r.spares_on_hand} cut ${r.spares_on_hand === 1 ? 'copy is' : 'copies are'} on hand for this placement.`, 'applied')
      await advance(trx, r, from, { state: 'applied', applied_by: actor.id, applied_at: new Date(), applied_count: applied })
      await audit(trx, { ...by(actor), action: 'mark-applied', subject: 'job', subjectId: r.job_id, detail: { ...jobRef(r), applied }, about: { robotId: r.robot_id } })
    }
    return findJob(trx, actor, r.job_id)
  })
  return jobDetail(db, actor, moved!)
}

/** A queued job in a batch is cut with its batch: alone, it would take sheets of its own. */
function inNoBatch(r: Pick<JobRow, 'job_id' | 'batch_id' | 'state'>) {
  if (r.batch_id !== null && r.state === 'queued') {
    throw createError({ statusCode: 409, message: `Job ${r.job_id} is in batch ${r.batch_id}: mark the batch cut, or take the job out of it first.` })
  }
}

/** A job that has not been cut is cancelled, with the reason. The caller has checked `queue.work`. */
export async function cancelJob(db: Db, actor: Actor, r: JobRow, reason: string): Promise<JobDetail> {
  if (r.state !== 'queued') throw createError({ statusCode: 409, message: `This job is ${r.state}: only a job waiting to be cut can be cancelled.` })
  const after = await inTransaction(db, async (trx) => {
    await cancelQueued(trx, actor, r, reason)
    return findJob(trx, actor, r.job_id)
  })
  return jobDetail(db, actor, after!)
}

/** Cancels one queued job in the caller's transaction (also used when a placement changes). */
export async function cancelQueued(trx: Transaction<Database>, actor: Actor, r: JobNames, reason: string) {
  await advance(trx, r, 'queued', { state: 'cancelled', cancelled_by: actor.id, cancelled_at: new Date(), cancel_reason: reason })
  await audit(trx, { ...by(actor), action: 'cancel-job', subject: 'job', subjectId: r.job_id, detail: { ...jobRef(r), reason }, about: { robotId: r.robot_id } })
}

/**
 * A cut that failed (burnt, lifted, mis-weeded) is recorded as such and queues a recut of the
 * same revision at the same width. From a queued job the cut used its sheets and the copies
 * not spoilt join those on hand; from a cut job the spoilt copies leave them. The caller has
 * checked `queue.work`.
 */
export async function failJob(db: Db, actor: Actor, r: JobRow, input: z.output<typeof jobFailureSchema>): Promise<JobDetail> {
  if (r.state !== 'queued' && r.state !== 'cut') throw createError({ statusCode: 409, message: `This job is ${r.state}: a failed cut is recorded while it is queued or cut.` })
  if (r.state === 'queued') inNoBatch(r)
  const spoilt = input.copies ?? r.job_quantity
  if (spoilt > r.job_quantity) throw fieldError(400, `This job cuts ${r.job_quantity}: at most that many can be spoilt.`, 'copies')
  const queuedSheets = r.state === 'queued' ? input.sheetsUsed ?? await defaultSheetCount([r]) : 0
  const after = await inTransaction(db, async (trx) => {
    const now = new Date()
    if (r.state === 'queued') {
      const sheets = queuedSheets
      await advance(trx, r, 'queued', { state: 'failed', cut_by: actor.id, cut_at: now, sheets_used: sheets, failed_by: actor.id, failed_at: now, failure: input.failure, failure_note: input.note })
      await takeSheets(trx, actor, { filmId: r.film_id, sheets, jobId: r.job_id, kind: 'failed-cut' })
      if (r.job_quantity > spoilt && countsCopies(r)) await trx.updateTable('placement').set((eb) => ({ spares_on_hand: eb('spares_on_hand', '+', r.job_quantity - spoilt) })).where('id', '=', r.placement_id).execute()
    } else {
      await advance(trx, r, 'cut', { state: 'failed', failed_by: actor.id, failed_at: now, failure: input.failure, failure_note: input.note })
      if (countsCopies(r)) await trx.updateTable('placement').set((eb) => ({ spares_on_hand: eb.fn('greatest', [eb.lit(0), eb('spares_on_hand', '-', spoilt)]) })).where('id', '=', r.placement_id).execute()
    }
    const words = `${CUT_FAILURE_LABELS[input.failure]}${input.note ? `: ${input.note}` : ''}`
    const recutJobId = await queueJob(trx, actor, {
      placementId: r.placement_id, filmId: r.film_id, kind: 'recut', quantity: spoilt, widthMm: r.job_width, reason: `Job ${r.job_id} failed (${words}).`, recutOf: r.job_id,
      // Of a layered decal, only the failed layer is cut again, in the same order.
      ...(r.layer !== null && r.order_id !== null ? { layer: r.layer, orderId: r.order_id } : {}),
      teamId: r.teamId, robotId: r.robot_id, robotName: r.robot_name, title: r.title, spot: r.spot,
    })
    await audit(trx, {
      ...by(actor), action: 'fail-job', subject: 'job', subjectId: r.job_id,
      detail: { ...jobRef(r), failure: input.failure, note: input.note, recutJobId, recutCopies: spoilt }, about: { robotId: r.robot_id },
    })
    return findJob(trx, actor, r.job_id)
  })
  return jobDetail(db, actor, after!)
}

/** One sheet of the job's cut sheet, with the file's name. The caller has checked `queue.work`. */
export async function jobSheetFile(db: Db, actor: Actor, r: JobRow, o: SheetOptions, format: 'svg' | 'dxf', sheet: number): Promise<SheetAnswer & { name: string }> {
  // The database already refuses such a job; this guards the file itself as well.
  if (!r.film_cleared) {
    const film = await filmOfProgram(db, actor.programId, r.film_id)
    throw createError({ statusCode: 422, message: (film && notUsableBecause(film)) ?? 'This film may not be cut.' })
  }
  const answer = await keptOrQueued(db, actor, [r], o, format, sheet, { jobIds: [r.job_id] })
  return { ...answer, name: `job-${r.job_id}-${fileSlug(r.title, 40, 'decal')}-r${r.revision_number}` }
}
