import type { H3Event } from 'h3'
import { sql } from 'kysely'
import type { JobDetail, JobState, JobView } from '#shared/types/robots'
import { estimateCutSeconds, formatDuration, MOVE_ALLOWANCE_S } from '#shared/utils/cut-time'
import { layoutSheets } from '#shared/utils/sheet-layout'
import type { Selectable } from 'kysely'
import type { FilmTable } from '../db/schema'
import type { Actor } from './actor'
import { toFilm } from './films'
import { fileSlug } from './file-names'
import { readCleanVector, type CutCurve } from '../cutsheet/path'
import { cutSheetSvg } from '../cutsheet/svg'
import { cutSheetDxf } from '../cutsheet/dxf'

/** Operators and mentors see the program's whole cut queue; team members see their team's jobs. */
function mayWorkQueue(actor: Actor): boolean {
  return actor.isMentor || [...actor.memberships.values()].includes('operator')
}

export function requireQueueWorker(actor: Actor): void {
  if (!mayWorkQueue(actor)) throw createError({ statusCode: 403, message: 'Only an operator or a mentor works the cut queue.' })
}

function jobsQuery(actor: Actor) {
  let q = useDb().selectFrom('job')
    .innerJoin('placement', 'placement.id', 'job.placement_id')
    .innerJoin('robot', 'robot.id', 'placement.robot_id')
    .innerJoin('team', 'team.id', 'robot.team_id')
    .innerJoin('revision', 'revision.id', 'placement.revision_id')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('film', 'film.id', 'job.film_id')
    .innerJoin('users as creator', 'creator.id', 'job.created_by')
    .leftJoin('users as cutter', 'cutter.id', 'job.cut_by')
    .leftJoin('users as applier', 'applier.id', 'job.applied_by')
    .where('team.program_id', '=', actor.programId)
  if (!mayWorkQueue(actor)) q = q.where('team.id', 'in', [0, ...actor.memberships.keys()])
  return q.selectAll('film').select([
    'job.id as job_id', 'job.kind', 'job.quantity as job_quantity', 'job.reason', 'job.state', 'job.created_at as job_created_at', 'job.cut_at', 'job.applied_at',
    'creator.name as creator_name', 'cutter.name as cutter_name', 'applier.name as applier_name',
    'placement.id as placement_id', 'placement.spot', 'placement.width_mm as placement_width',
    'robot.id as robot_id', 'robot.name as robot_name', 'robot.season',
    'team.id as team_id', 'team.name as team_name', 'team.colour as team_colour',
    'revision.id as revision_id', 'revision.number as revision_number', 'revision.width_mm as revision_width', 'revision.height_mm as revision_height',
    'revision.vector_key', 'revision.measurements', 'artwork.id as artwork_id', 'artwork.title',
  ])
}

type JobRow = Awaited<ReturnType<ReturnType<typeof jobsQuery>['executeTakeFirstOrThrow']>>

function toView(r: JobRow): JobView {
  return {
    id: r.job_id, kind: r.kind, quantity: r.job_quantity, reason: r.reason, state: r.state,
    createdAt: new Date(r.job_created_at).toISOString(), createdBy: r.creator_name,
    cutAt: r.cut_at ? new Date(r.cut_at).toISOString() : null, cutBy: r.cutter_name,
    appliedAt: r.applied_at ? new Date(r.applied_at).toISOString() : null, appliedBy: r.applier_name,
    placement: { id: r.placement_id, spot: r.spot, widthMm: r.placement_width, heightMm: (r.placement_width * r.revision_height) / r.revision_width },
    robot: { id: r.robot_id, name: r.robot_name, season: r.season },
    team: { id: r.team_id, name: r.team_name, colour: r.team_colour },
    revision: { id: r.revision_id, number: r.revision_number, artworkId: r.artwork_id, title: r.title, vectorUrl: `/api/revisions/${r.revision_id}/vector.svg` },
    film: filmFromRow(r),
  }
}

export async function listJobs(actor: Actor, f: { filmId?: number; teamId?: number; state?: JobState }): Promise<JobView[]> {
  let q = jobsQuery(actor)
  if (f.filmId) q = q.where('job.film_id', '=', f.filmId)
  if (f.teamId) q = q.where('team.id', '=', f.teamId)
  if (f.state) q = q.where('job.state', '=', f.state)
  // Queued first (oldest first: first asked, first cut), then the rest newest first.
  const rows = await q.orderBy(sql`job.state = 'queued'`, 'desc').orderBy(sql`case when job.state = 'queued' then job.id else -job.id end`).limit(500).execute()
  return rows.map(toView)
}

async function findJobRow(actor: Actor, id: number): Promise<JobRow> {
  const row = await jobsQuery(actor).where('job.id', '=', id).executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, message: 'No such job.' })
  return row
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

export interface SheetOptions { mirror: boolean; frame: number; gap: number; margin: number }

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

export async function jobDetail(actor: Actor, id: number, o: SheetOptions = { mirror: false, frame: 0, gap: 3, margin: 5 }): Promise<JobDetail> {
  const r = await findJobRow(actor, id)
  const scale = r.placement_width / r.revision_width
  const m = r.measurements
  const cutLengthMm = m.cutLengthMm * scale
  const layout = layoutFor(r, { widthMm: r.placement_width, heightMm: (r.placement_width * r.revision_height) / r.revision_width }, o)
  const seconds = estimateCutSeconds({ cutLengthMm: cutLengthMm * r.job_quantity, pieces: (m.pieces + m.holes) * r.job_quantity, speedMmS: r.laser_speed_mm_s, passes: r.laser_passes })
  const history = await useDb().selectFrom('audit_event').leftJoin('users', 'users.id', 'audit_event.actor_id')
    .select(['audit_event.at', 'audit_event.action', 'audit_event.detail', 'users.name'])
    .where('audit_event.program_id', '=', actor.programId).where('audit_event.subject_type', '=', 'job').where('audit_event.subject_id', '=', String(id))
    .orderBy('audit_event.id').execute()
  return {
    ...toView(r),
    layout: { perSheet: layout.perSheet, sheets: layout.sheets, turned: layout.turned, usagePercent: layout.usagePercent, fits: layout.fits, reason: layout.reason, columns: layout.columns, rows: layout.rows },
    cutLengthMm, pieces: m.pieces,
    estimate: {
      seconds, text: formatDuration(seconds),
      how: `Cut length ${Math.round(cutLengthMm * r.job_quantity)} mm × ${r.laser_passes} pass${r.laser_passes === 1 ? '' : 'es'} ÷ ${r.laser_speed_mm_s} mm/s, plus ${MOVE_ALLOWANCE_S} s per outline per pass for the moves between them.`,
    },
    history: history.map((h) => ({ at: new Date(h.at).toISOString(), action: h.action, by: h.name, detail: h.detail })),
  }
}

/** queued → cut → applied, forward only, with who and when. */
export async function moveJob(event: H3Event, actor: Actor, id: number, to: 'cut' | 'applied'): Promise<JobDetail> {
  requireQueueWorker(actor)
  const r = await findJobRow(actor, id)
  const from = r.state
  if ((to === 'cut' && from !== 'queued') || (to === 'applied' && from !== 'cut')) {
    throw createError({ statusCode: 409, message: to === 'cut' ? `This job is ${from} already.` : 'A job is applied after it is cut.' })
  }
  await useDb().transaction().execute(async (trx) => {
    const set = to === 'cut' ? { state: to, cut_by: actor.id, cut_at: new Date() } : { state: to, applied_by: actor.id, applied_at: new Date() }
    const done = await trx.updateTable('job').set(set).where('id', '=', id).where('state', '=', from).executeTakeFirst()
    if (!done.numUpdatedRows) throw createError({ statusCode: 409, message: 'Someone else moved this job just now. Reload the page.' })
    await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: to === 'cut' ? 'mark-cut' : 'mark-applied', subjectType: 'job', subjectId: id, detail: { title: r.title, robot: r.robot_name, spot: r.spot, quantity: r.job_quantity, placementId: r.placement_id } })
  })
  return jobDetail(actor, id)
}

export async function cutSheetFiles(actor: Actor, id: number, o: SheetOptions, format: 'svg' | 'dxf'): Promise<{ files: string[]; name: string }> {
  requireQueueWorker(actor)
  const r = await findJobRow(actor, id)
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
  return { files, name: `job-${id}-${fileSlug(r.title, 40, 'decal')}-r${r.revision_number}` }
}

function filmFromRow(r: JobRow) {
  // selectAll('film') put the film's own columns (and its id) on the row.
  return toFilm(r as unknown as Selectable<FilmTable>)
}

export function sendCutSheet(event: H3Event, sheets: { files: string[]; name: string }, format: 'svg' | 'dxf', sheet: number): string {
  const file = sheets.files[sheet - 1]
  if (!file) throw createError({ statusCode: 404, message: `This job has ${sheets.files.length} sheet${sheets.files.length === 1 ? '' : 's'}.` })
  const suffix = sheets.files.length > 1 ? `-sheet${sheet}of${sheets.files.length}` : ''
  setResponseHeaders(event, {
    'content-type': format === 'svg' ? 'image/svg+xml' : 'application/dxf',
    'content-disposition': `attachment; filename="${sheets.name}${suffix}.${format}"`,
    'x-content-type-options': 'nosniff',
    'content-security-policy': "default-src 'none'; style-src 'unsafe-inline'; sandbox",
    'x-sheet-count': String(sheets.files.length),
  })
  return file
}
