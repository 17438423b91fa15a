import { sql, type ExpressionBuilder } from 'kysely'
import { jsonArrayFrom } from 'kysely/helpers/postgres'
import type { Database } from '../db/schema'
import type { Db } from '../platform/db'
import { teamScope, type Actor } from '../policy'

/** A robot's placements (not the removed ones), each with its jobs, as one JSON column of the robot's row. */
function placementsOf(eb: ExpressionBuilder<Database, 'robot'>) {
  return jsonArrayFrom(eb.selectFrom('placement')
    .innerJoin('revision', 'revision.id', 'placement.revision_id')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('film', 'film.id', 'placement.film_id')
    .innerJoin('users', 'users.id', 'placement.created_by')
    .select((p) => [
      'placement.id', 'placement.spot', 'placement.side', 'placement.width_mm', 'placement.quantity', 'placement.spares', 'placement.spares_on_hand', 'placement.needed_at_events', 'placement.created_at',
      'revision.id as revision_id', 'revision.number', 'revision.width_mm as revision_width', 'revision.height_mm as revision_height',
      'artwork.id as artwork_id', 'artwork.title', 'film.id as film_id', 'film.name as film_name', 'film.colour as film_colour', 'film.colour_hex as film_colour_hex',
      'users.name as created_by',
      jsonArrayFrom(p.selectFrom('job').select(['job.id', 'job.kind', 'job.quantity', 'job.state', 'job.width_mm as widthMm', 'job.layer', 'job.order_id as orderId'])
        .whereRef('job.placement_id', '=', 'placement.id').orderBy('job.id')).as('jobs'),
      // A layered decal's layers, bottom first, each with its film.
      jsonArrayFrom(p.selectFrom('revision_layer as rl')
        .leftJoin('placement_layer_film as plf', (j) => j.onRef('plf.placement_id', '=', 'placement.id').onRef('plf.position', '=', 'rl.position'))
        .innerJoin('film as lf', (j) => j.on(sql<boolean>`lf.id = coalesce(plf.film_id, placement.film_id)`))
        .select(['rl.position', 'rl.name', 'rl.hex', 'lf.id as film_id', 'lf.name as film_name', 'lf.colour as film_colour', 'lf.colour_hex as film_colour_hex'])
        .whereRef('rl.revision_id', '=', 'placement.revision_id').orderBy('rl.position')).as('layers'),
    ])
    .whereRef('placement.robot_id', '=', 'robot.id')
    .where('placement.removed_at', 'is', null)
    .orderBy('placement.id'))
}

function visibleRobots(db: Db, actor: Actor) {
  return db.selectFrom('robot').innerJoin('team', 'team.id', 'robot.team_id')
    .select((eb) => [
      'robot.id', 'robot.name', 'robot.season', 'team.id as teamId', 'team.program_id as programId', 'team.name as team_name', 'team.colour as team_colour',
      placementsOf(eb).as('placements'),
    ])
    .where(teamScope(actor, 'robot.view'))
}

export type RobotRow = Awaited<ReturnType<ReturnType<typeof visibleRobots>['executeTakeFirstOrThrow']>>

export function findRobot(db: Db, actor: Actor, id: number): Promise<RobotRow | undefined> {
  return visibleRobots(db, actor).where('robot.id', '=', id).executeTakeFirst()
}

export interface RobotKey { teamId: number; season: string; name: string; id: number }

/** By team, newest season first, then by name (the robot_order index), after the row `after`. */
export function robotPage(db: Db, actor: Actor, f: { teamId?: number }, after: RobotKey | undefined, limit: number) {
  let q = visibleRobots(db, actor)
  if (f.teamId) q = q.where('robot.team_id', '=', f.teamId)
  if (after) {
    q = q.where(sql<boolean>`(robot.team_id > ${after.teamId}
      or (robot.team_id = ${after.teamId} and robot.season < ${after.season})
      or (robot.team_id = ${after.teamId} and robot.season = ${after.season} and (robot.name, robot.id) > (${after.name}, ${after.id})))`)
  }
  return q.orderBy('robot.team_id').orderBy('robot.season', 'desc').orderBy('robot.name').orderBy('robot.id').limit(limit).execute()
}

/** A placement with what a reprint or an edit needs, if the actor may see its robot. */
export function findPlacement(db: Db, actor: Actor, id: number, o: { lock?: boolean } = {}) {
  const q = db.selectFrom('placement').innerJoin('robot', 'robot.id', 'placement.robot_id').innerJoin('team', 'team.id', 'robot.team_id')
    .innerJoin('revision', 'revision.id', 'placement.revision_id').innerJoin('artwork', 'artwork.id', 'revision.artwork_id').innerJoin('film', 'film.id', 'placement.film_id')
    .select(['placement.id', 'placement.spot', 'placement.side', 'placement.film_id', 'placement.width_mm', 'placement.quantity', 'placement.spares', 'placement.spares_on_hand', 'placement.needed_at_events',
      'placement.removed_at', 'placement.revision_id', 'revision.number as revision_number', 'revision.artwork_id',
      'robot.id as robot_id', 'robot.name as robot_name', 'team.id as teamId', 'team.program_id as programId',
      'artwork.title', 'film.name as film_name', 'film.cleared as film_cleared', 'film.retired as film_retired'])
    .where('placement.id', '=', id).where(teamScope(actor, 'robot.view'))
  return (o.lock ? q.forUpdate('placement') : q).executeTakeFirst()
}

/** A placement's jobs still waiting to be cut, with the names the history needs. */
export function queuedJobsOf(db: Db, placementId: number) {
  return db.selectFrom('job').innerJoin('placement', 'placement.id', 'job.placement_id').innerJoin('robot', 'robot.id', 'placement.robot_id')
    .innerJoin('revision', 'revision.id', 'placement.revision_id').innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .select(['job.id as job_id', 'job.quantity as job_quantity', 'job.width_mm', 'robot.id as robot_id', 'robot.name as robot_name', 'placement.spot', 'artwork.title'])
    .where('job.placement_id', '=', placementId).where('job.state', '=', 'queued').orderBy('job.id').execute()
}

export type PlacementRow = NonNullable<Awaited<ReturnType<typeof findPlacement>>>

/** The layers of revisions, bottom first (none for one-colour revisions). */
export function layersOfRevisions(db: Db, revisionIds: number[]) {
  if (revisionIds.length === 0) return Promise.resolve([])
  return db.selectFrom('revision_layer').select(['revision_id', 'position', 'name', 'hex'])
    .where('revision_id', 'in', revisionIds).orderBy('revision_id').orderBy('position').execute()
}

/** Every approved revision of a team's artworks, the choice for a new placement. */
export function approvedRevisionsOfTeam(db: Db, teamId: number) {
  return db.selectFrom('revision')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('revision_status', 'revision_status.revision_id', 'revision.id')
    .select(['revision.id', 'revision.number', 'revision.width_mm', 'revision.height_mm', 'artwork.id as artwork_id', 'artwork.title',
      sql<number | null>`(revision.measurements->>'narrowestFeatureMm')::double precision`.as('narrowest_mm')])
    .where('artwork.team_id', '=', teamId).where('revision_status.status', '=', 'approved')
    .orderBy('artwork.title').orderBy('revision.number', 'desc')
    .execute()
}
