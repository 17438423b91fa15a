// Robots, the decals placed on them, and reprints of exactly the placed revision.
import { createError } from 'h3'
import { z } from 'zod'
import type { Page } from '#shared/types/api'
import type { ApprovedRevision, PlacementView, RobotView } from '#shared/types/robots'
import { decodeCursor, pageOf } from '../platform/cursor'
import { inTransaction, type Db } from '../platform/db'
import { fieldError } from '../platform/http'
import { flags, type Actor, type TeamSubject } from '../policy'
import { audit, by } from '../history/service'
import { findRevision } from '../artworks/queries'
import { CHLORINE_REASON } from '../films/service'
import { filmOfProgram } from '../films/queries'
import { queueJob } from '../jobs/service'
import { approvedRevisionsOfTeam, findRobot, robotPage, type PlacementRow, type RobotKey, type RobotRow } from './queries'

const iso = (t: Date | string) => new Date(t).toISOString()

export function toRobotView(actor: Actor, r: RobotRow): RobotView {
  return {
    id: r.id, name: r.name, season: r.season, team: { id: r.teamId, name: r.team_name, colour: r.team_colour },
    placements: r.placements.map((p): PlacementView => ({
      id: p.id, spot: p.spot, widthMm: p.width_mm, heightMm: (p.width_mm * p.revision_height) / p.revision_width,
      quantity: p.quantity, spares: p.spares,
      film: { id: p.film_id, name: p.film_name, colour: p.film_colour },
      revision: { id: p.revision_id, number: p.number, artworkId: p.artwork_id, title: p.title, vectorUrl: `/api/revisions/${p.revision_id}/vector.svg` },
      createdAt: iso(p.created_at), createdBy: p.created_by,
      jobs: p.jobs,
    })),
    can: flags(actor, ['placement.create', 'placement.reprint', 'queue.work'], r),
  }
}

const robotCursor = z.object({ teamId: z.number().int().positive(), season: z.string().max(40), name: z.string().max(80), id: z.number().int().positive() })

/** The robots the actor may see, by team, newest season first, a page at a time. */
export async function listRobots(db: Db, actor: Actor, o: { teamId?: number; cursor?: string; limit: number }): Promise<Page<RobotView>> {
  const rows = await robotPage(db, actor, o, decodeCursor(o.cursor, robotCursor), o.limit + 1)
  return pageOf(rows, o.limit, (r) => toRobotView(actor, r), (r): RobotKey => ({ teamId: r.teamId, season: r.season, name: r.name, id: r.id }))
}

/** A new robot for a team of the program. The caller has checked `robot.create` and found the team. */
export async function createRobot(db: Db, actor: Actor, team: TeamSubject, input: { name: string; season: string }): Promise<RobotView> {
  return inTransaction(db, async (trx) => {
    const clash = await trx.selectFrom('robot').select('id').where('team_id', '=', team.teamId).where('name', '=', input.name).where('season', '=', input.season).executeTakeFirst()
    if (clash) throw fieldError(409, 'This team has a robot of that name this season already.', 'name', 'Already taken this season.')
    const row = await trx.insertInto('robot').values({ team_id: team.teamId, name: input.name, season: input.season }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, { ...by(actor), action: 'add-robot', subject: 'robot', subjectId: row.id, detail: { name: input.name, season: input.season } })
    return toRobotView(actor, (await findRobot(trx, actor, row.id))!)
  })
}

/** The approved revisions that may go on the robot (its team's). */
export async function approvedRevisions(db: Db, robot: RobotRow): Promise<ApprovedRevision[]> {
  const rows = await approvedRevisionsOfTeam(db, robot.teamId)
  return rows.map((r) => ({ revisionId: r.id, artworkId: r.artwork_id, title: r.title, number: r.number, widthMm: r.width_mm, heightMm: r.height_mm, narrowestMm: r.narrowest_mm }))
}

/**
 * Puts an approved revision of the robot's team on the robot, in chlorine-free film, and
 * queues its first cut. The caller has found the robot and checked `placement.create`.
 */
export async function createPlacement(db: Db, actor: Actor, robot: RobotRow, input: { revisionId: number; filmId: number; spot: string; widthMm: number; quantity: number; spares: number }): Promise<PlacementView> {
  const placementId = await inTransaction(db, async (trx) => {
    const revision = await findRevision(trx, actor, input.revisionId)
    if (!revision || revision.teamId !== robot.teamId) {
      throw fieldError(400, 'Please check the form: choose an approved revision of this team.', 'revisionId', 'Choose an approved revision of this team\'s artwork.')
    }
    if (revision.status !== 'approved') {
      throw fieldError(409, 'Only approved revisions can be placed on a robot. Submit it for review first.', 'revisionId', 'Not approved yet.')
    }
    const film = await filmOfProgram(trx, actor.programId, input.filmId)
    if (!film) throw fieldError(400, 'Please check the form: choose a film from the stock.', 'filmId', 'Choose a film from the stock.')
    if (!film.chlorine_free) throw fieldError(422, CHLORINE_REASON, 'filmId', 'Not chlorine-free: never laser it.')
    if (film.retired) throw fieldError(422, 'That film is retired from the stock.', 'filmId', 'Retired.')
    const p = await trx.insertInto('placement').values({
      robot_id: robot.id, revision_id: revision.id, film_id: film.id, spot: input.spot, width_mm: input.widthMm,
      quantity: input.quantity, spares: input.spares, created_by: actor.id,
    }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, {
      ...by(actor), action: 'place', subject: 'robot', subjectId: robot.id, about: { artworkId: revision.artwork_id },
      detail: { title: revision.title, revision: revision.number, spot: input.spot, film: film.name, quantity: input.quantity, spares: input.spares },
    })
    await queueJob(trx, actor, {
      placementId: p.id, filmId: film.id, kind: 'initial', quantity: input.quantity + input.spares, reason: '',
      teamId: robot.teamId, robotId: robot.id, robotName: robot.name, title: revision.title, spot: input.spot,
    })
    return p.id
  })
  const after = await findRobot(db, actor, robot.id)
  return toRobotView(actor, after!).placements.find((p) => p.id === placementId)!
}

/** More copies of exactly the placed revision. The caller has found the placement and checked `placement.reprint`. */
export async function requestReprint(db: Db, actor: Actor, placement: PlacementRow, input: { quantity: number; reason: string }): Promise<{ jobId: number }> {
  if (placement.retired) throw createError({ statusCode: 422, message: 'The film of this placement is retired; a mentor can place the decal again in another film.' })
  const jobId = await inTransaction(db, (trx) => queueJob(trx, actor, {
    placementId: placement.id, filmId: placement.film_id, kind: 'reprint', quantity: input.quantity, reason: input.reason,
    teamId: placement.teamId, robotId: placement.robot_id, robotName: placement.robot_name, title: placement.title, spot: placement.spot,
  }))
  return { jobId }
}
