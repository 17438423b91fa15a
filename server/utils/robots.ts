import type { H3Event } from 'h3'
import type { Transaction } from 'kysely'
import type { Database } from '../db/schema'
import type { PlacementView, RobotView } from '#shared/types/robots'
import type { Actor } from './actor'
import { newJobMail } from '../mail/templates'

function visibleTeamIds(actor: Actor): number[] | null {
  return actor.isMentor ? null : [0, ...actor.memberships.keys()]
}

export async function listRobots(actor: Actor, teamId?: number): Promise<RobotView[]> {
  let q = useDb().selectFrom('robot').innerJoin('team', 'team.id', 'robot.team_id')
    .select(['robot.id', 'robot.name', 'robot.season', 'team.id as team_id', 'team.name as team_name', 'team.colour as team_colour'])
    .where('team.program_id', '=', actor.programId)
    .orderBy('team.name').orderBy('robot.season', 'desc').orderBy('robot.name')
  const teams = visibleTeamIds(actor)
  if (teams) q = q.where('robot.team_id', 'in', teams)
  if (teamId) q = q.where('robot.team_id', '=', teamId)
  const robots = await q.execute()
  const placements = await placementsOf(robots.map((r) => r.id))
  return robots.map((r) => ({
    id: r.id, name: r.name, season: r.season, team: { id: r.team_id, name: r.team_name, colour: r.team_colour },
    placements: placements.filter((p) => p.robotId === r.id).map(({ robotId: _, ...p }) => p),
  }))
}

export async function findRobot(actor: Actor, id: number): Promise<RobotView> {
  const [robot] = (await listRobots(actor)).filter((r) => r.id === id)
  if (!robot) throw createError({ statusCode: 404, message: 'No such robot.' })
  return robot
}

async function placementsOf(robotIds: number[]): Promise<(PlacementView & { robotId: number })[]> {
  if (!robotIds.length) return []
  const db = useDb()
  const rows = await db.selectFrom('placement')
    .innerJoin('revision', 'revision.id', 'placement.revision_id')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('film', 'film.id', 'placement.film_id')
    .innerJoin('users', 'users.id', 'placement.created_by')
    .select(['placement.id', 'placement.robot_id', 'placement.spot', 'placement.width_mm', 'placement.quantity', 'placement.spares', 'placement.created_at',
      'revision.id as revision_id', 'revision.number', 'revision.width_mm as revision_width', 'revision.height_mm as revision_height', 'artwork.id as artwork_id', 'artwork.title',
      'film.id as film_id', 'film.name as film_name', 'film.colour as film_colour', 'users.name as created_by'])
    .where('placement.robot_id', 'in', robotIds).orderBy('placement.id').execute()
  const jobs = rows.length
    ? await db.selectFrom('job').select(['id', 'placement_id', 'kind', 'quantity', 'state']).where('placement_id', 'in', rows.map((r) => r.id)).orderBy('id').execute()
    : []
  return rows.map((r) => ({
    id: r.id, robotId: r.robot_id, spot: r.spot, widthMm: r.width_mm, heightMm: (r.width_mm * r.revision_height) / r.revision_width,
    quantity: r.quantity, spares: r.spares,
    film: { id: r.film_id, name: r.film_name, colour: r.film_colour },
    revision: { id: r.revision_id, number: r.number, artworkId: r.artwork_id, title: r.title, vectorUrl: `/api/revisions/${r.revision_id}/vector.svg` },
    createdAt: new Date(r.created_at).toISOString(), createdBy: r.created_by,
    jobs: jobs.filter((j) => j.placement_id === r.id).map((j) => ({ id: j.id, kind: j.kind, quantity: j.quantity, state: j.state })),
  }))
}

export async function createRobot(event: H3Event, actor: Actor, input: { teamId: number; name: string; season: string }): Promise<RobotView> {
  const id = await useDb().transaction().execute(async (trx) => {
    const clash = await trx.selectFrom('robot').select('id').where('team_id', '=', input.teamId).where('name', '=', input.name).where('season', '=', input.season).executeTakeFirst()
    if (clash) throw createError({ statusCode: 409, message: 'This team has a robot of that name this season already.', data: { fieldErrors: { name: ['Already taken this season.'] } } })
    const row = await trx.insertInto('robot').values({ team_id: input.teamId, name: input.name, season: input.season }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'add-robot', subjectType: 'robot', subjectId: row.id, detail: { name: input.name, season: input.season } })
    return row.id
  })
  return findRobot(actor, id)
}

/** The operators who cut for this team, or every operator of the program when it has none. */
async function operatorsFor(programId: number, teamId: number): Promise<string[]> {
  const db = useDb()
  const base = db.selectFrom('membership').innerJoin('users', 'users.id', 'membership.user_id').innerJoin('team', 'team.id', 'membership.team_id')
    .select('users.email').distinct().where('membership.role', '=', 'operator').where('users.active', '=', true).where('team.program_id', '=', programId)
  const own = await base.where('membership.team_id', '=', teamId).execute()
  return (own.length ? own : await base.execute()).map((r) => r.email)
}

async function queueJob(trx: Transaction<Database>, o: {
  event: H3Event; actor: Actor; placementId: number; filmId: number; kind: 'initial' | 'reprint'; quantity: number; reason: string
  teamId: number; robotName: string; title: string; spot: string
}): Promise<number> {
  const job = await trx.insertInto('job').values({ placement_id: o.placementId, kind: o.kind, quantity: o.quantity, reason: o.reason, film_id: o.filmId, created_by: o.actor.id })
    .returning('id').executeTakeFirstOrThrow()
  await audit(trx, o.event, { programId: o.actor.programId, actorId: o.actor.id, action: o.kind === 'initial' ? 'queue-job' : 'reprint', subjectType: 'job', subjectId: job.id, detail: { title: o.title, robot: o.robotName, spot: o.spot, quantity: o.quantity, reason: o.reason, placementId: o.placementId } })
  const to = await operatorsFor(o.actor.programId, o.teamId)
  if (to.length) await sendMail(newJobMail({ to, kind: o.kind, title: o.title, robot: o.robotName, spot: o.spot, quantity: o.quantity, reason: o.reason, by: o.actor.name, url: absoluteUrl(`/lab/jobs/${job.id}`) }))
  return job.id
}

/** Puts an approved revision on a robot, in chlorine-free film, and queues its first cut. */
export async function createPlacement(event: H3Event, actor: Actor, input: { robotId: number; revisionId: number; filmId: number; spot: string; widthMm: number; quantity: number; spares: number }) {
  const robot = await findRobot(actor, input.robotId)
  if (!canActInTeam(actor, robot.team.id, 'designer')) throw createError({ statusCode: 403, message: 'Only a designer or a mentor may place decals on a robot.' })
  const revision = await findRevision(actor, input.revisionId).catch(() => null)
  if (!revision || revision.team_id !== robot.team.id) {
    throw createError({ statusCode: 400, message: 'Please check the form: choose an approved revision of this team.', data: { fieldErrors: { revisionId: ['Choose an approved revision of this team\'s artwork.'] } } })
  }
  if (revision.status !== 'approved') {
    throw createError({ statusCode: 409, message: 'Only approved revisions can be placed on a robot. Submit it for review first.', data: { fieldErrors: { revisionId: ['Not approved yet.'] } } })
  }
  const film = await useDb().selectFrom('film').selectAll().where('id', '=', input.filmId).where('program_id', '=', actor.programId).executeTakeFirst()
  if (!film) throw createError({ statusCode: 400, message: 'Please check the form: choose a film from the stock.', data: { fieldErrors: { filmId: ['Choose a film from the stock.'] } } })
  if (!film.chlorine_free) throw createError({ statusCode: 422, message: CHLORINE_REASON, data: { fieldErrors: { filmId: ['Not chlorine-free: never laser it.'] } } })
  if (film.retired) throw createError({ statusCode: 422, message: 'That film is retired from the stock.', data: { fieldErrors: { filmId: ['Retired.'] } } })
  const placementId = await useDb().transaction().execute(async (trx) => {
    const p = await trx.insertInto('placement').values({
      robot_id: robot.id, revision_id: revision.id, film_id: film.id, spot: input.spot, width_mm: input.widthMm,
      quantity: input.quantity, spares: input.spares, created_by: actor.id,
    }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'place', subjectType: 'robot', subjectId: robot.id, detail: { title: revision.title, revision: revision.number, spot: input.spot, film: film.name, quantity: input.quantity, spares: input.spares, placementId: p.id, artworkId: revision.artwork_id } })
    await queueJob(trx, { event, actor, placementId: p.id, filmId: film.id, kind: 'initial', quantity: input.quantity + input.spares, reason: '', teamId: robot.team.id, robotName: robot.name, title: revision.title, spot: input.spot })
    return p.id
  })
  return (await findRobot(actor, robot.id)).placements.find((p) => p.id === placementId)!
}

/** Anyone on the team (any role) or a mentor asks for more copies of exactly the placed revision. */
export async function requestReprint(event: H3Event, actor: Actor, placementId: number, input: { quantity: number; reason: string }) {
  const row = await useDb().selectFrom('placement').innerJoin('robot', 'robot.id', 'placement.robot_id').innerJoin('team', 'team.id', 'robot.team_id')
    .innerJoin('revision', 'revision.id', 'placement.revision_id').innerJoin('artwork', 'artwork.id', 'revision.artwork_id').innerJoin('film', 'film.id', 'placement.film_id')
    .select(['placement.id', 'placement.spot', 'placement.film_id', 'robot.id as robot_id', 'robot.name as robot_name', 'team.id as team_id', 'artwork.title', 'film.chlorine_free', 'film.retired'])
    .where('placement.id', '=', placementId).where('team.program_id', '=', actor.programId).executeTakeFirst()
  if (!row || (!actor.isMentor && !actor.memberships.has(row.team_id))) throw createError({ statusCode: 404, message: 'No such placement.' })
  if (row.retired) throw createError({ statusCode: 422, message: 'The film of this placement is retired; a mentor can place the decal again in another film.' })
  const jobId = await useDb().transaction().execute((trx) => queueJob(trx, {
    event, actor, placementId: row.id, filmId: row.film_id, kind: 'reprint', quantity: input.quantity, reason: input.reason,
    teamId: row.team_id, robotName: row.robot_name, title: row.title, spot: row.spot,
  }))
  return { jobId }
}
