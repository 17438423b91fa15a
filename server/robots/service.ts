// Robots, the decals placed on them, reprints of exactly the placed revision, and corrections:
// a placement edited or removed, spares put on the robot, a robot renamed.
import { createError } from 'h3'
import type { Transaction } from 'kysely'
import { z } from 'zod'
import type { Database } from '../db/schema'
import type { Page } from '#shared/types/api'
import type { ApprovedRevision, PlacementView, RobotView } from '#shared/types/robots'
import type { applySpareSchema, placementPatchSchema, placementSchema, reprintSchema, robotPatchSchema } from '#shared/utils/schemas'
import { decodeCursor, pageOf } from '../platform/cursor'
import { inTransaction, type Db } from '../platform/db'
import { fieldError } from '../platform/http'
import { flags, type Actor, type TeamSubject } from '../policy'
import { audit, by } from '../history/service'
import { findRevision } from '../artworks/queries'
import { notUsableBecause } from '../films/service'
import { filmOfProgram, filmsOfProgram, type FilmRow } from '../films/queries'
import { layerFilmsOfPlacement } from '../jobs/queries'
import { filmsByColour } from './film-colours'
import { cancelQueued, queueJob, queueJobs, refusedFilm } from '../jobs/service'
import { approvedRevisionsOfTeam, findPlacement, layersOfRevisions, findRobot, queuedJobsOf, robotPage, type PlacementRow, type RobotKey, type RobotRow } from './queries'
import { planPlacementChange, type PlacementPlan } from './plan'
import type { RobotSide } from '#shared/plates/profiles'

const iso = (t: Date | string) => new Date(t).toISOString()

export function toRobotView(actor: Actor, r: RobotRow): RobotView {
  return {
    id: r.id, name: r.name, season: r.season, team: { id: r.teamId, name: r.team_name, colour: r.team_colour },
    placements: r.placements.map((p): PlacementView => ({
      id: p.id, spot: p.spot, side: p.side, widthMm: p.width_mm, heightMm: (p.width_mm * p.revision_height) / p.revision_width,
      quantity: p.quantity, spares: p.spares, sparesOnHand: p.spares_on_hand, neededAtEvents: p.needed_at_events,
      film: { id: p.film_id, name: p.film_name, colour: p.film_colour, colourHex: p.film_colour_hex },
      layers: p.layers.map((l) => ({ position: l.position, name: l.name, hex: l.hex, film: { id: l.film_id, name: l.film_name, colour: l.film_colour, colourHex: l.film_colour_hex } })),
      revision: { id: p.revision_id, number: p.number, artworkId: p.artwork_id, title: p.title, vectorUrl: `/api/revisions/${p.revision_id}/vector.svg` },
      createdAt: iso(p.created_at), createdBy: p.created_by,
      jobs: p.jobs,
    })),
    can: flags(actor, ['placement.create', 'placement.edit', 'placement.reprint', 'robot.edit', 'queue.work'], r),
  }
}

const robotCursor = z.object({ teamId: z.number().int().positive(), season: z.string().max(40), name: z.string().max(80), id: z.number().int().positive() })

/** The robots the actor may see, by team, newest season first, a page at a time. */
export async function listRobots(db: Db, actor: Actor, o: { teamId?: number; cursor?: string; limit: number }): Promise<Page<RobotView>> {
  const rows = await robotPage(db, actor, o, decodeCursor(o.cursor, robotCursor), o.limit + 1)
  return pageOf(rows, o.limit, (r) => toRobotView(actor, r), (r): RobotKey => ({ teamId: r.teamId, season: r.season, name: r.name, id: r.id }))
}

async function nameIsFree(trx: Transaction<Database>, teamId: number, name: string, season: string, except = 0) {
  const clash = await trx.selectFrom('robot').select('id').where('team_id', '=', teamId).where('name', '=', name).where('season', '=', season).where('id', '<>', except).executeTakeFirst()
  if (clash) throw fieldError(409, 'This team has a robot of that name this season already.', 'name', 'Already taken this season.')
}

/** A new robot for a team of the program. The caller has checked `robot.create` and found the team. */
export async function createRobot(db: Db, actor: Actor, team: TeamSubject, input: { name: string; season: string }): Promise<RobotView> {
  return inTransaction(db, async (trx) => {
    await nameIsFree(trx, team.teamId, input.name, input.season)
    const row = await trx.insertInto('robot').values({ team_id: team.teamId, name: input.name, season: input.season }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, { ...by(actor), action: 'add-robot', subject: 'robot', subjectId: row.id, detail: { name: input.name, season: input.season } })
    return toRobotView(actor, (await findRobot(trx, actor, row.id))!)
  })
}

/** A robot's name and season. The caller has found the robot and checked `robot.edit`. */
export async function editRobot(db: Db, actor: Actor, robot: RobotRow, input: z.output<typeof robotPatchSchema>): Promise<RobotView> {
  return inTransaction(db, async (trx) => {
    const name = input.name ?? robot.name
    const season = input.season ?? robot.season
    await nameIsFree(trx, robot.teamId, name, season, robot.id)
    await trx.updateTable('robot').set({ name, season }).where('id', '=', robot.id).execute()
    await audit(trx, { ...by(actor), action: 'edit-robot', subject: 'robot', subjectId: robot.id, detail: { name, season, from: { name: robot.name, season: robot.season } } })
    return toRobotView(actor, (await findRobot(trx, actor, robot.id))!)
  })
}

/** The approved revisions that may go on the robot (its team's); a layered one's layers each with the films nearest its colour. */
export async function approvedRevisions(db: Db, robot: RobotRow): Promise<ApprovedRevision[]> {
  const rows = await approvedRevisionsOfTeam(db, robot.teamId)
  const [layers, films] = await Promise.all([layersOfRevisions(db, rows.map((r) => r.id)), filmsOfProgram(db, robot.programId)])
  const swatches = films.map((f) => ({ id: f.id, colourHex: f.colour_hex, usable: notUsableBecause(f) === null }))
  return rows.map((r) => ({
    revisionId: r.id, artworkId: r.artwork_id, title: r.title, number: r.number, widthMm: r.width_mm, heightMm: r.height_mm, narrowestMm: r.narrowest_mm,
    layers: layers.filter((l) => l.revision_id === r.id)
      .map((l) => ({ position: l.position, name: l.name, hex: l.hex, suggestedFilmIds: filmsByColour(l.hex, swatches) })),
  }))
}

/** A placement asked for (the robot is the caller's; the side may be left out). */
type PlacementInput = Omit<z.output<typeof placementSchema>, 'robotId' | 'side' | 'neededAtEvents'> & { side?: RobotSide | null; neededAtEvents?: boolean }

/**
 * The films a placement is cut in, bottom layer first (one for a one-colour decal), each found
 * in the program's stock and cleared for the laser; refused in a sentence naming the layer.
 */
async function filmsForPlacement(trx: Transaction<Database>, actor: Actor, layers: { name: string }[], input: PlacementInput) {
  const field = layers.length ? 'layerFilmIds' : 'filmId'
  const ids = layers.length ? input.layerFilmIds ?? [] : [input.filmId ?? input.layerFilmIds![0]!]
  if (layers.length && ids.length !== layers.length) {
    throw fieldError(400, `Please check the form: this decal has ${layers.length} layers, so it needs a film for each, bottom layer first.`, field, `Choose ${layers.length} films, one per layer.`)
  }
  if (!layers.length && (input.layerFilmIds?.length ?? 0) > 1) {
    throw fieldError(400, 'Please check the form: this decal is one colour, so it is cut in one film.', 'layerFilmIds', 'One film only.')
  }
  const films: FilmRow[] = []
  for (const [i, id] of ids.entries()) {
    const which = layers.length ? `Layer ${i + 1} (${layers[i]!.name}): ` : ''
    const film = await filmOfProgram(trx, actor.programId, id)
    if (!film) throw fieldError(400, `Please check the form: ${which ? `${which.toLowerCase()}choose` : 'choose'} a film from the stock.`, field, 'Choose a film from the stock.')
    const refused = notUsableBecause(film)
    if (refused) throw fieldError(422, `${which}${refused}`, field, film.cleared ? 'Retired.' : film.polymer_verdict === 'never' ? 'Never cut this film.' : 'Needs the lab\'s approval first.')
    films.push(film)
  }
  return films
}

async function placementView(db: Db, actor: Actor, robotId: number, placementId: number): Promise<PlacementView> {
  const after = await findRobot(db, actor, robotId)
  return toRobotView(actor, after!).placements.find((p) => p.id === placementId)!
}

/**
 * Puts an approved revision of the robot's team on the robot, in film the register clears for
 * cutting, and queues its first cut. The caller has found the robot and checked `placement.create`.
 */
export async function createPlacement(db: Db, actor: Actor, robot: RobotRow, input: PlacementInput): Promise<PlacementView> {
  const placementId = await inTransaction(db, async (trx) => {
    const revision = await findRevision(trx, actor, input.revisionId)
    if (!revision || revision.teamId !== robot.teamId) {
      throw fieldError(400, 'Please check the form: choose an approved revision of this team.', 'revisionId', 'Choose an approved revision of this team\'s artwork.')
    }
    if (revision.status !== 'approved') {
      throw fieldError(409, 'Only approved revisions can be placed on a robot. Submit it for review first.', 'revisionId', 'Not approved yet.')
    }
    const layers = await layersOfRevisions(trx, [revision.id])
    const films = await filmsForPlacement(trx, actor, layers, input)
    const film = films[0]!
    const p = await trx.insertInto('placement').values({
      robot_id: robot.id, revision_id: revision.id, film_id: film.id, spot: input.spot, side: input.side ?? null, width_mm: input.widthMm,
      quantity: input.quantity, spares: input.spares, needed_at_events: input.neededAtEvents ?? false, created_by: actor.id,
    }).returning('id').executeTakeFirstOrThrow().catch(refusedFilm)
    if (layers.length) {
      await trx.insertInto('placement_layer_film').values(films.map((f, position) => ({ placement_id: p.id, position, film_id: f.id }))).execute().catch(refusedFilm)
    }
    await audit(trx, {
      ...by(actor), action: 'place', subject: 'robot', subjectId: robot.id, about: { artworkId: revision.artwork_id },
      detail: {
        title: revision.title, revision: revision.number, spot: input.spot, film: films.map((f) => f.name).join(', '), quantity: input.quantity, spares: input.spares,
        ...(input.neededAtEvents ? { neededAtEvents: true } : {}),
      },
    })
    await queueJob(trx, actor, {
      placementId: p.id, filmId: film.id, kind: 'initial', quantity: input.quantity + input.spares, widthMm: input.widthMm, reason: '',
      teamId: robot.teamId, robotId: robot.id, robotName: robot.name, title: revision.title, spot: input.spot,
    })
    return p.id
  })
  return placementView(db, actor, robot.id, placementId)
}

function mustBeHere(p: PlacementRow) {
  if (p.removed_at) throw createError({ statusCode: 409, message: 'This placement was removed from the robot.' })
}

/** Every film the cut needs (each layer's, or the one layer's asked for) may still be cut. */
async function mayCutMore(db: Db, p: PlacementRow, layer?: number) {
  const layers = (await layerFilmsOfPlacement(db, p.id)).filter((l) => layer === undefined || l.position === layer)
  const films = layers.length ? layers : [{ film_name: p.film_name, film_cleared: p.film_cleared, film_retired: p.film_retired }]
  for (const f of films) {
    if (!f.film_cleared) throw createError({ statusCode: 422, message: `${f.film_name} may not be cut: see the film's page. Place the decal again in another film.` })
    if (f.film_retired) throw createError({ statusCode: 422, message: `${f.film_name} is retired; a mentor can place the decal again in another film.` })
  }
}

const jobFor = (p: PlacementRow) => ({ placementId: p.id, filmId: p.film_id, teamId: p.teamId, robotId: p.robot_id, robotName: p.robot_name, title: p.title, spot: p.spot })

/** More copies of exactly the placed revision. The caller has found the placement and checked `placement.reprint`. */
export async function requestReprint(db: Db, actor: Actor, placement: PlacementRow, input: z.output<typeof reprintSchema>): Promise<{ jobId: number; jobIds: number[]; sparesOnHand: number }> {
  mustBeHere(placement)
  await mayCutMore(db, placement, input.layer)
  const jobIds = await inTransaction(db, (trx) => queueJobs(trx, actor, { ...jobFor(placement), kind: 'reprint', quantity: input.quantity, widthMm: placement.width_mm, reason: input.reason, layer: input.layer }))
  return { jobId: jobIds[0]!, jobIds, sparesOnHand: placement.spares_on_hand }
}

/** Spares from the shelf put on the robot. The caller has found the placement and checked `placement.reprint`. */
export async function applySpare(db: Db, actor: Actor, placement: PlacementRow, input: z.output<typeof applySpareSchema>): Promise<PlacementView> {
  mustBeHere(placement)
  await inTransaction(db, async (trx) => {
    const taken = await trx.updateTable('placement').set((eb) => ({ spares_on_hand: eb('spares_on_hand', '-', input.count) }))
      .where('id', '=', placement.id).where('spares_on_hand', '>=', input.count).returning('spares_on_hand').executeTakeFirst()
    if (!taken) {
      const left = (await trx.selectFrom('placement').select('spares_on_hand').where('id', '=', placement.id).executeTakeFirstOrThrow()).spares_on_hand
      throw fieldError(409, left ? `Only ${left} spare${left === 1 ? ' is' : 's are'} on hand.` : 'No spares are on hand: ask for a reprint.', 'count')
    }
    await audit(trx, {
      ...by(actor), action: 'apply-spare', subject: 'robot', subjectId: placement.robot_id, about: { artworkId: placement.artwork_id },
      detail: { placementId: placement.id, title: placement.title, robot: placement.robot_name, spot: placement.spot, count: input.count, reason: input.reason, sparesOnHand: taken.spares_on_hand },
    })
  })
  return placementView(db, actor, placement.robot_id, placement.id)
}

export interface PlacementChange {
  placement: PlacementView
  /** The job queued for what the change added, if any. */
  queuedJobId: number | null
  /** Every job queued (one per layer of a layered decal). */
  queuedJobIds: number[]
  /** Queued jobs the change made obsolete (a new width). */
  cancelledJobIds: number[]
  /** In words: what happened to the cut queue. */
  summary: string
}

/**
 * Changes a placement's spot, width, copies or spares. What must be cut afterwards that is not
 * cut or queued already is queued as a job of its own; jobs that are cut stay as they were; a
 * new width cancels the queued jobs at the old width (they would cut the wrong size) and sets
 * the spares at the old size aside. The caller has found the placement and checked `placement.edit`.
 */
export async function editPlacement(db: Db, actor: Actor, found: PlacementRow, patch: z.output<typeof placementPatchSchema>): Promise<PlacementChange> {
  const done = await inTransaction(db, async (trx) => {
    // Read again under a lock: two edits at once must not both queue the difference.
    const placement = (await findPlacement(trx, actor, found.id, { lock: true }))!
    mustBeHere(placement)
    const plan = planPlacementChange(
      { spot: placement.spot, widthMm: placement.width_mm, quantity: placement.quantity, spares: placement.spares, sparesOnHand: placement.spares_on_hand },
      patch,
    )
    if (plan.copiesToQueue > 0) await mayCutMore(trx, placement)
    const after = plan.after
    const side = patch.side === undefined ? placement.side : patch.side
    if (side !== placement.side) plan.changes.side = { from: placement.side, to: side }
    const neededAtEvents = patch.neededAtEvents ?? placement.needed_at_events
    if (neededAtEvents !== placement.needed_at_events) plan.changes.neededAtEvents = { from: placement.needed_at_events, to: neededAtEvents }
    await trx.updateTable('placement').set({
      side, needed_at_events: neededAtEvents,
      spot: after.spot, width_mm: after.widthMm, quantity: after.quantity, spares: after.spares, ...(plan.resized ? { spares_on_hand: 0 } : {}),
    }).where('id', '=', placement.id).where('removed_at', 'is', null).execute()
    const names = { ...placement, spot: after.spot }
    // A layered decal's copies are one job per layer, in one order.
    const queuedJobIds = plan.copiesToQueue > 0
      ? await queueJobs(trx, actor, {
          ...jobFor(names), kind: 'extra', quantity: plan.copiesToQueue, widthMm: after.widthMm,
          reason: plan.resized ? `The placement is now ${after.widthMm} mm wide.` : `The placement now needs ${after.quantity} on the robot and ${after.spares} spare${after.spares === 1 ? '' : 's'}.`,
        })
      : []
    const queuedJobId = queuedJobIds[0] ?? null
    const cancelled: number[] = []
    if (plan.resized) {
      for (const j of await queuedJobsOf(trx, placement.id)) {
        if (queuedJobIds.includes(j.job_id)) continue
        await cancelQueued(trx, actor, j, `The placement was changed from ${placement.width_mm} mm to ${after.widthMm} mm wide${queuedJobId ? `; job ${queuedJobId} cuts the new size` : ''}.`)
        cancelled.push(j.job_id)
      }
    }
    await audit(trx, {
      ...by(actor), action: 'edit-placement', subject: 'robot', subjectId: placement.robot_id, about: { artworkId: placement.artwork_id },
      detail: { placementId: placement.id, title: placement.title, robot: placement.robot_name, spot: after.spot, changes: plan.changes },
    })
    return { queuedJobId, queuedJobIds, cancelled, summary: changeSummary(plan, queuedJobId, cancelled) }
  })
  return {
    placement: await placementView(db, actor, found.robot_id, found.id),
    queuedJobId: done.queuedJobId, queuedJobIds: done.queuedJobIds, cancelledJobIds: done.cancelled, summary: done.summary,
  }
}

function changeSummary(plan: PlacementPlan, queued: number | null, cancelled: number[]): string {
  const parts: string[] = []
  if (queued) parts.push(`Job ${queued} queued for ${plan.copiesToQueue} ${plan.copiesToQueue === 1 ? 'copy' : 'copies'}.`)
  if (cancelled.length) parts.push(`Cancelled ${cancelled.map((id) => `job ${id}`).join(', ')}: ${cancelled.length === 1 ? 'it was' : 'they were'} for the old width.`)
  if (plan.setAside > 0) parts.push(`${plan.setAside} spare${plan.setAside === 1 ? '' : 's'} at the old size set aside.`)
  if (plan.surplus > 0) parts.push(`${plan.surplus} ${plan.surplus === 1 ? 'copy' : 'copies'} already cut or queued beyond what is needed now: cancel a queued job on its page if you do not want them.`)
  return parts.join(' ') || 'Nothing to cut changed.'
}

/** Takes a placement off the robot: its queued jobs are cancelled; cut jobs and the history stay. The caller has checked `placement.edit`. */
export async function removePlacement(db: Db, actor: Actor, found: PlacementRow, reason: string): Promise<{ cancelledJobIds: number[] }> {
  return inTransaction(db, async (trx) => {
    const placement = (await findPlacement(trx, actor, found.id, { lock: true }))!
    mustBeHere(placement)
    const cancelled: number[] = []
    for (const j of await queuedJobsOf(trx, placement.id)) {
      await cancelQueued(trx, actor, j, `The placement was removed: ${reason}`)
      cancelled.push(j.job_id)
    }
    const done = await trx.updateTable('placement').set({ removed_by: actor.id, removed_at: new Date(), removed_reason: reason })
      .where('id', '=', placement.id).where('removed_at', 'is', null).executeTakeFirst()
    if (!done.numUpdatedRows) throw createError({ statusCode: 409, message: 'Someone else removed this placement just now.' })
    await audit(trx, {
      ...by(actor), action: 'remove-placement', subject: 'robot', subjectId: placement.robot_id, about: { artworkId: placement.artwork_id },
      detail: { placementId: placement.id, title: placement.title, robot: placement.robot_name, spot: placement.spot, reason },
    })
    return { cancelledJobIds: cancelled }
  })
}
