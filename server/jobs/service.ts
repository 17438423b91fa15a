// The cut queue: jobs from placements and reprints, their cut sheets, and queued → cut → applied.
import { createError } from 'h3'
import type { Selectable, Transaction } from 'kysely'
import { z } from 'zod'
import type { Database, FilmTable } from '../db/schema'
import type { Page } from '#shared/types/api'
import type { JobDetail, JobView } from '#shared/types/robots'
import { CUT_SHEET_LIMITS } from '#shared/constants/cut-sheet'
import { estimateCutSeconds, formatDuration, MOVE_ALLOWANCE_S } from '#shared/utils/cut-time'
import { layoutSheets } from '#shared/utils/sheet-layout'
import { readCleanVector, type CutCurve } from '../cutsheet/path'
import { cutSheetSvg } from '../cutsheet/svg'
import { cutSheetDxf } from '../cutsheet/dxf'
import { decodeCursor, pageOf } from '../platform/cursor'
import { inTransaction, type Db } from '../platform/db'
import { absoluteUrl, queueMail } from '../platform/mail'
import { fileSlug } from '../platform/file-names'
import { getObject } from '../platform/object-store'
import { flags, type Actor } from '../policy'
import { audit, by, historyOf } from '../history/service'
import { newJobMail } from '../mail/templates'
import { CHLORINE_REASON, toFilm } from '../films/service'
import { findJob, jobPage, operatorEmails, type JobFilter, type JobRow } from './queries'

export interface SheetOptions { mirror: boolean; frame: number; gap: number; margin: number }
export const DEFAULT_SHEET: SheetOptions = { mirror: false, frame: CUT_SHEET_LIMITS.frame.default, gap: CUT_SHEET_LIMITS.gap.default, margin: CUT_SHEET_LIMITS.margin.default }

export interface NewJob {
  placementId: number
  filmId: number
  kind: 'initial' | 'reprint'
  quantity: number
  reason: string
  /** What the job is for, for the history and the operators' mail. */
  teamId: number
  robotId: number
  robotName: string
  title: string
  spot: string
}

/**
 * Queues a cut, writes its history line and mails the operators, all in the caller's
 * transaction: every query here goes through `trx`, never a second pool connection.
 */
export async function queueJob(trx: Transaction<Database>, actor: Actor, o: NewJob): Promise<number> {
  const job = await trx.insertInto('job').values({ placement_id: o.placementId, kind: o.kind, quantity: o.quantity, reason: o.reason, film_id: o.filmId, created_by: actor.id })
    .returning('id').executeTakeFirstOrThrow()
  await audit(trx, {
    ...by(actor), action: o.kind === 'initial' ? 'queue-job' : 'reprint', subject: 'job', subjectId: job.id,
    detail: { title: o.title, robot: o.robotName, spot: o.spot, quantity: o.quantity, reason: o.reason }, about: { robotId: o.robotId },
  })
  const to = await operatorEmails(trx, actor.programId, o.teamId)
  await queueMail(trx, actor.programId, newJobMail({ to, kind: o.kind, title: o.title, robot: o.robotName, spot: o.spot, quantity: o.quantity, reason: o.reason, by: actor.name, url: absoluteUrl(`/lab/jobs/${job.id}`) }))
  return job.id
}

function toView(r: JobRow): JobView {
  return {
    id: r.job_id, kind: r.kind, quantity: r.job_quantity, reason: r.reason, state: r.state,
    createdAt: new Date(r.job_created_at).toISOString(), createdBy: r.creator_name,
    cutAt: r.cut_at ? new Date(r.cut_at).toISOString() : null, cutBy: r.cutter_name,
    appliedAt: r.applied_at ? new Date(r.applied_at).toISOString() : null, appliedBy: r.applier_name,
    placement: { id: r.placement_id, spot: r.spot, widthMm: r.placement_width, heightMm: (r.placement_width * r.revision_height) / r.revision_width },
    robot: { id: r.robot_id, name: r.robot_name, season: r.season },
    team: { id: r.teamId, name: r.team_name, colour: r.team_colour },
    revision: { id: r.revision_id, number: r.revision_number, artworkId: r.artwork_id, title: r.title, vectorUrl: `/api/revisions/${r.revision_id}/vector.svg` },
    // selectAll('film') put the film's own columns (and its id) on the row.
    film: toFilm(r as unknown as Selectable<FilmTable>),
  }
}

const queueCursor = z.object({ rank: z.number().int().min(0).max(1), key: z.number().int() })

/** The cut queue, a page at a time. */
export async function listJobs(db: Db, actor: Actor, o: JobFilter & { cursor?: string; limit: number }): Promise<Page<JobView>> {
  const rows = await jobPage(db, actor, o, decodeCursor(o.cursor, queueCursor), o.limit + 1)
  return pageOf(rows, o.limit, toView, (r) => ({ rank: r.order_rank, key: r.order_key }))
}

/** The placed copy's curves at the placement's width (the revision's vector scaled). */
async function copyGeometry(r: JobRow): Promise<{ curves: CutCurve[]; widthMm: number; heightMm: number }> {
  const vector = readCleanVector((await getObject(r.vector_key)).toString('utf8'))
  const k = r.placement_width / vector.widthMm
  const s = (p: { x: number; y: number }) => ({ x: p.x * k, y: p.y * k })
  const curves = vector.curves.map((c) => ({
    segments: c.segments.map((g) => g.kind === 'line'
      ? { kind: 'line' as const, from: s(g.from), to: s(g.to) }
      : { kind: 'cubic' as const, from: s(g.from), c1: s(g.c1), c2: s(g.c2), to: s(g.to) }),
  }))
  return { curves, widthMm: vector.widthMm * k, heightMm: vector.heightMm * k }
}

function layoutFor(r: JobRow, copy: { widthMm: number; heightMm: number }, o: SheetOptions) {
  try {
    return layoutSheets({
      copyWidthMm: copy.widthMm, copyHeightMm: copy.heightMm, copies: r.job_quantity,
      sheetWidthMm: r.sheet_width_mm, sheetHeightMm: r.sheet_height_mm, gapMm: o.gap, marginMm: o.margin,
      weedingFrameMm: o.frame > 0 ? o.frame : undefined,
    })
  } catch (err) {
    if (err instanceof RangeError) throw createError({ statusCode: 422, message: err.message })
    throw err
  }
}

/** The job's page. The caller has found the job in the actor's scope. */
export async function jobDetail(db: Db, actor: Actor, r: JobRow, o: SheetOptions = DEFAULT_SHEET): Promise<JobDetail> {
  const scale = r.placement_width / r.revision_width
  const m = r.measurements
  const cutLengthMm = m.cutLengthMm * scale
  const layout = layoutFor(r, { widthMm: r.placement_width, heightMm: (r.placement_width * r.revision_height) / r.revision_width }, o)
  const seconds = estimateCutSeconds({ cutLengthMm: cutLengthMm * r.job_quantity, pieces: (m.pieces + m.holes) * r.job_quantity, speedMmS: r.laser_speed_mm_s, passes: r.laser_passes })
  const history = await historyOf(db, actor, { jobId: r.job_id })
  return {
    ...toView(r),
    layout: { perSheet: layout.perSheet, sheets: layout.sheets, turned: layout.turned, usagePercent: layout.usagePercent, fits: layout.fits, reason: layout.reason, columns: layout.columns, rows: layout.rows },
    cutLengthMm, pieces: m.pieces,
    estimate: {
      seconds, text: formatDuration(seconds),
      how: `Cut length ${Math.round(cutLengthMm * r.job_quantity)} mm × ${r.laser_passes} pass${r.laser_passes === 1 ? '' : 'es'} ÷ ${r.laser_speed_mm_s} mm/s, plus ${MOVE_ALLOWANCE_S} s per outline per pass for the moves between them.`,
    },
    history: history.map((h) => ({ at: h.at, action: h.action, by: h.by, detail: h.detail })),
    can: flags(actor, ['queue.work'], r),
  }
}

/** queued → cut → applied, forward only, with who and when. The caller has checked `queue.work`. */
export async function moveJob(db: Db, actor: Actor, r: JobRow, to: 'cut' | 'applied'): Promise<JobDetail> {
  const from = r.state
  if ((to === 'cut' && from !== 'queued') || (to === 'applied' && from !== 'cut')) {
    throw createError({ statusCode: 409, message: to === 'cut' ? `This job is ${from} already.` : 'A job is applied after it is cut.' })
  }
  const moved = await inTransaction(db, async (trx) => {
    const set = to === 'cut' ? { state: to, cut_by: actor.id, cut_at: new Date() } : { state: to, applied_by: actor.id, applied_at: new Date() }
    const done = await trx.updateTable('job').set(set).where('id', '=', r.job_id).where('state', '=', from).executeTakeFirst()
    if (!done.numUpdatedRows) throw createError({ statusCode: 409, message: 'Someone else moved this job just now. Reload the page.' })
    await audit(trx, {
      ...by(actor), action: to === 'cut' ? 'mark-cut' : 'mark-applied', subject: 'job', subjectId: r.job_id,
      detail: { title: r.title, robot: r.robot_name, spot: r.spot, quantity: r.job_quantity }, about: { robotId: r.robot_id },
    })
    return findJob(trx, actor, r.job_id)
  })
  return jobDetail(db, actor, moved!)
}

export interface CutSheetFiles { files: string[]; name: string }

/** The cut sheet as one file per sheet. The caller has checked `queue.work`. */
export async function cutSheetFiles(r: JobRow, o: SheetOptions, format: 'svg' | 'dxf'): Promise<CutSheetFiles> {
  // The database already refuses such a job; this guards the file itself as well.
  if (!r.chlorine_free) throw createError({ statusCode: 422, message: CHLORINE_REASON })
  const copy = await copyGeometry(r)
  const layout = layoutFor(r, copy, o)
  if (!layout.fits) throw createError({ statusCode: 422, message: `The decal does not fit on a ${r.sheet_width_mm} × ${r.sheet_height_mm} mm sheet of this film: ${layout.reason ?? 'make it smaller'}.` })
  const input = {
    curves: copy.curves, copyWidthMm: copy.widthMm, copyHeightMm: copy.heightMm, layout,
    sheetWidthMm: r.sheet_width_mm, sheetHeightMm: r.sheet_height_mm, mirror: o.mirror, weedingFrameMm: o.frame > 0 ? o.frame : null,
  }
  let files: string[]
  try {
    files = format === 'svg' ? cutSheetSvg(input) : cutSheetDxf(input)
  } catch (err) {
    // Frames that would leave the sheet or cross a neighbour, and the like: say what to change.
    if (err instanceof RangeError) throw createError({ statusCode: 422, message: `${err.message} Change the gap, margin or weeding frame.` })
    throw err
  }
  return { files, name: `job-${r.job_id}-${fileSlug(r.title, 40, 'decal')}-r${r.revision_number}` }
}
