import { sql } from 'kysely'
import type { JobState } from '#shared/types/robots'
import type { Db } from '../platform/db'
import { teamScope, type Actor } from '../policy'

/** Jobs the actor may see, with everything a job's card and page show joined in. */
function visibleJobs(db: Db, actor: Actor) {
  return db.selectFrom('job')
    .innerJoin('placement', 'placement.id', 'job.placement_id')
    .innerJoin('robot', 'robot.id', 'placement.robot_id')
    .innerJoin('team', 'team.id', 'robot.team_id')
    .innerJoin('revision', 'revision.id', 'placement.revision_id')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('film', 'film.id', 'job.film_id')
    .innerJoin('users as creator', 'creator.id', 'job.created_by')
    .leftJoin('users as cutter', 'cutter.id', 'job.cut_by')
    .leftJoin('users as applier', 'applier.id', 'job.applied_by')
    .where(teamScope(actor, 'job.view'))
    .selectAll('film')
    .select([
      'job.id as job_id', 'job.kind', 'job.quantity as job_quantity', 'job.reason', 'job.state', 'job.created_at as job_created_at', 'job.cut_at', 'job.applied_at',
      'creator.name as creator_name', 'cutter.name as cutter_name', 'applier.name as applier_name',
      'placement.id as placement_id', 'placement.spot', 'placement.width_mm as placement_width',
      'robot.id as robot_id', 'robot.name as robot_name', 'robot.season',
      'team.id as teamId', 'team.program_id as programId', 'team.name as team_name', 'team.colour as team_colour',
      'revision.id as revision_id', 'revision.number as revision_number', 'revision.width_mm as revision_width', 'revision.height_mm as revision_height',
      'revision.vector_key', 'revision.measurements', 'artwork.id as artwork_id', 'artwork.title',
    ])
}

export type JobRow = Awaited<ReturnType<ReturnType<typeof visibleJobs>['executeTakeFirstOrThrow']>>

export function findJob(db: Db, actor: Actor, id: number): Promise<JobRow | undefined> {
  return visibleJobs(db, actor).where('job.id', '=', id).executeTakeFirst()
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
