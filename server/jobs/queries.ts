import { sql } from 'kysely'
import { jsonArrayFrom } from 'kysely/helpers/postgres'
import type { JobState } from '#shared/types/robots'
import type { Measurements } from '#shared/types/pipeline'
import type { MarksCut } from '#shared/utils/cut-time'
import type { Db } from '../platform/db'
import { teamScope, type Actor } from '../policy'

/** Jobs the actor may see, with everything a job's card and page show joined in (the film itself comes from the films' own query). */
function jobsOnFilm(db: Db) {
  return db.selectFrom('job')
    .innerJoin('placement', 'placement.id', 'job.placement_id')
    .innerJoin('robot', 'robot.id', 'placement.robot_id')
    .innerJoin('team', 'team.id', 'robot.team_id')
    .innerJoin('revision', 'revision.id', 'placement.revision_id')
    .innerJoin('film', 'film.id', 'job.film_id')
}

function visibleJobs(db: Db, actor: Actor) {
  return jobsOnFilm(db)
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    // A layered decal's job cuts its layer: that layer's vector (stacked, with the marks) and measurements.
    .leftJoin('revision_layer as cut_layer', (j) => j.onRef('cut_layer.revision_id', '=', 'revision.id').onRef('cut_layer.position', '=', 'job.layer'))
    .innerJoin('users as creator', 'creator.id', 'job.created_by')
    .leftJoin('users as cutter', 'cutter.id', 'job.cut_by')
    .leftJoin('users as applier', 'applier.id', 'job.applied_by')
    .leftJoin('users as canceller', 'canceller.id', 'job.cancelled_by')
    .leftJoin('users as failer', 'failer.id', 'job.failed_by')
    .where(teamScope(actor, 'job.view'))
    .select((eb) => [
      'job.id as job_id', 'job.kind', 'job.quantity as job_quantity', 'job.reason', 'job.state', 'job.created_at as job_created_at', 'job.cut_at', 'job.applied_at',
      'job.width_mm as job_width', 'job.sheets_used', 'job.applied_count', 'job.cancelled_at', 'job.cancel_reason', 'job.failed_at', 'job.failure', 'job.failure_note',
      'job.recut_of', 'job.film_id', 'job.batch_id',
      'creator.name as creator_name', 'cutter.name as cutter_name', 'applier.name as applier_name', 'canceller.name as canceller_name', 'failer.name as failer_name',
      'placement.id as placement_id', 'placement.spot', 'placement.quantity as placement_quantity', 'placement.spares_on_hand', 'placement.removed_at',
      'robot.id as robot_id', 'robot.name as robot_name', 'robot.season',
      'team.id as teamId', 'team.program_id as programId', 'team.name as team_name', 'team.colour as team_colour',
      'revision.id as revision_id', 'revision.number as revision_number', 'revision.width_mm as revision_width', 'revision.height_mm as revision_height',
      sql<string>`coalesce(cut_layer.vector_key, revision.vector_key)`.as('vector_key'),
      sql<Measurements & { marks?: MarksCut }>`coalesce(cut_layer.measurements, revision.measurements)`.as('measurements'),
      // How many registration marks a layer's sheet cuts beside it, for a layer stored before
      // its marks were measured with it: the frame's, or the three of a plate framed with them.
      sql<number>`case when job.layer is null then 0
        when jsonb_typeof(revision.colour->'frame'->'marks') = 'array' then jsonb_array_length(revision.colour->'frame'->'marks')
        when (revision.colour->>'marks')::boolean then 3 else 0 end`.as('stored_mark_count'),
      'artwork.id as artwork_id', 'artwork.title',
      'job.layer', 'job.order_id', 'revision.layer_count', 'cut_layer.name as layer_name', 'cut_layer.hex as layer_hex',
      // Every layer of the revision, for the order in which they are laid on the robot.
      jsonArrayFrom(eb.selectFrom('revision_layer as rl').select(['rl.position', 'rl.name', 'rl.hex'])
        .whereRef('rl.revision_id', '=', 'revision.id').orderBy('rl.position')).as('revision_layers'),
      jsonArrayFrom(eb.selectFrom('job as sibling').innerJoin('film as sf', 'sf.id', 'sibling.film_id')
        .innerJoin('revision_layer as sl', (j) => j.onRef('sl.revision_id', '=', 'revision.id').onRef('sl.position', '=', 'sibling.layer'))
        .select(['sibling.id', 'sibling.layer', 'sl.name', 'sf.name as filmName', 'sibling.state'])
        .whereRef('sibling.order_id', '=', 'job.order_id').orderBy('sibling.layer').orderBy('sibling.id')).$castTo<{ id: number; layer: number; name: string; filmName: string; state: JobState }[]>().as('order_jobs'),
      'film.sheet_width_mm', 'film.sheet_height_mm', 'film.laser_speed_mm_s', 'film.laser_passes', 'film.cleared as film_cleared', 'film.kerf_mm as film_kerf',
      eb.selectFrom('job as recut').select('recut.id').whereRef('recut.recut_of', '=', 'job.id').orderBy('recut.id').limit(1).as('recut_by'),
    ])
}

export type JobRow = Awaited<ReturnType<ReturnType<typeof visibleJobs>['executeTakeFirstOrThrow']>>

export function findJob(db: Db, actor: Actor, id: number): Promise<JobRow | undefined> {
  return visibleJobs(db, actor).where('job.id', '=', id).executeTakeFirst()
}

/** The jobs with these ids that the actor may see, in id order (fewer when some are not). */
export function findJobs(db: Db, actor: Actor, ids: number[]): Promise<JobRow[]> {
  if (ids.length === 0) return Promise.resolve([])
  return visibleJobs(db, actor).where('job.id', 'in', ids).orderBy('job.id').execute()
}

/** A batch's jobs, in id order. */
export function jobsOfBatch(db: Db, actor: Actor, batchId: number): Promise<JobRow[]> {
  return visibleJobs(db, actor).where('job.batch_id', '=', batchId).orderBy('job.id').execute()
}

// The queue's order: queued jobs first, oldest first (first asked, first cut); then the rest,
// newest first. Both parts of the key are in the job_queue_order index.
const rank = sql<number>`(job.state <> 'queued')::integer`
const within = sql<number>`case when job.state = 'queued' then job.id else -job.id end`

export interface JobFilter { filmId?: number; teamId?: number; state?: JobState }

export function jobPage(db: Db, actor: Actor, f: JobFilter, after: { rank: number; key: number } | undefined, limit: number) {
  let q = visibleJobs(db, actor).select([rank.as('order_rank'), within.as('order_key')])
  if (f.filmId) q = q.where('job.film_id', '=', f.filmId)
  if (f.teamId) q = q.where('team.id', '=', f.teamId)
  if (f.state) q = q.where('job.state', '=', f.state)
  if (after) q = q.where(sql<boolean>`(${rank}, ${within}) > (${after.rank}, ${after.key})`)
  return q.orderBy(rank).orderBy(within).limit(limit).execute()
}

/** The operators who cut for this team, or every operator of the program when it has none. */
export async function operatorEmails(db: Db, programId: number, teamId: number): Promise<string[]> {
  const base = db.selectFrom('membership').innerJoin('users', 'users.id', 'membership.user_id').innerJoin('team', 'team.id', 'membership.team_id')
    .select('users.email').distinct().where('membership.role', '=', 'operator').where('users.active', '=', true).where('team.program_id', '=', programId)
  const own = await base.where('membership.team_id', '=', teamId).execute()
  return (own.length ? own : await base.execute()).map((r) => r.email)
}

/**
 * Every queued job of the program in queue order (first queued, first cut), with what its
 * sheets need, for the stock forecast. All of them, not a page: the shelf is shared.
 */
export function queuedSheetInputs(db: Db, programId: number) {
  return jobsOnFilm(db)
    .select(['job.id', 'job.film_id', 'job.quantity', 'job.width_mm', 'revision.width_mm as revision_width', 'revision.height_mm as revision_height',
      'film.sheet_width_mm', 'film.sheet_height_mm', 'film.sheets_on_hand'])
    .where('team.program_id', '=', programId).where('job.state', '=', 'queued')
    .orderBy('job.id')
    .execute()
}

/**
 * The layers of a placement's revision, bottom first, each with the film it is cut in (the
 * placement's own film where no film was recorded for a layer); empty for one colour.
 */
export function layerFilmsOfPlacement(db: Db, placementId: number) {
  return db.selectFrom('placement')
    .innerJoin('revision_layer as rl', 'rl.revision_id', 'placement.revision_id')
    .leftJoin('placement_layer_film as plf', (j) => j.onRef('plf.placement_id', '=', 'placement.id').onRef('plf.position', '=', 'rl.position'))
    .innerJoin('film', (j) => j.on(sql<boolean>`film.id = coalesce(plf.film_id, placement.film_id)`))
    .select(['rl.position', 'rl.name', 'rl.hex', 'film.id as film_id', 'film.name as film_name', 'film.cleared as film_cleared', 'film.retired as film_retired'])
    .where('placement.id', '=', placementId).orderBy('rl.position').execute()
}
