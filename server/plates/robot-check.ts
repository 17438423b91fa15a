// A robot against its program's rule profile, and the event kit: spares of every plate and of
// every decal marked as needed at events, batched by film.
import { createError } from 'h3'
import { sql } from 'kysely'
import { jsonArrayFrom } from 'kysely/helpers/postgres'
import { checkRobotPlates, scaleToPlacement, type PlacedPlate } from '../../shared/plates/check'
import type { RobotSide } from '../../shared/plates/profiles'
import type { EventKit, PlateFacts, RobotPlateCheck } from '../../shared/types/plates'
import { inTransaction, type Db } from '../platform/db'
import { flags, type Actor } from '../policy'
import { queueCuts } from '../jobs/service'
import { createBatch } from '../batches/service'
import type { RobotRow } from '../robots/queries'
import { chosenProfile, resolveProfile } from './queries'

/** The robot's placements of generated plate layers (not the removed ones). */
function platePlacements(db: Db, robotId: number) {
  return db.selectFrom('placement')
    .innerJoin('revision', 'revision.id', 'placement.revision_id')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('film', 'film.id', 'placement.film_id')
    .select(['placement.id', 'placement.side', 'placement.spot', 'placement.width_mm', 'placement.quantity', 'placement.spares', 'placement.film_id',
      'revision.width_mm as revision_width', 'revision.height_mm as revision_height', 'artwork.title',
      sql<PlateFacts>`revision.plate`.as('plate'), 'film.colour as film_colour', 'film.name as film_name', 'film.cleared as film_cleared', 'film.retired as film_retired',
      // A layered plate's film per layer, bottom first: the colours the check reads.
      (eb) => jsonArrayFrom(eb.selectFrom('placement_layer_film as plf').innerJoin('film as lf', 'lf.id', 'plf.film_id')
        .select(['plf.position', 'lf.colour']).whereRef('plf.placement_id', '=', 'placement.id').orderBy('plf.position')).as('layer_films')])
    .where('placement.robot_id', '=', robotId).where('placement.removed_at', 'is', null).where('revision.origin', '=', 'generated')
    .orderBy('placement.id').execute()
}

type PlateRow = Awaited<ReturnType<typeof platePlacements>>[number]

/** The robot's placements whose spares travel in the event kit: every plate layer and every decal marked as needed at events. */
function kitPlacements(db: Db, robotId: number) {
  return db.selectFrom('placement')
    .innerJoin('revision', 'revision.id', 'placement.revision_id')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('film', 'film.id', 'placement.film_id')
    .select(['placement.id', 'placement.spot', 'placement.width_mm', 'placement.spares', 'placement.film_id', 'artwork.title',
      'film.name as film_name', 'film.cleared as film_cleared', 'film.retired as film_retired'])
    .where('placement.robot_id', '=', robotId).where('placement.removed_at', 'is', null)
    .where((eb) => eb.or([eb('revision.origin', '=', 'generated'), eb('placement.needed_at_events', '=', true)]))
    .orderBy('placement.id').execute()
}

/** The film colour a layered plate's placement gives the layer of this role (null: no such layer). */
function layerColour(row: PlateRow, role: 'numerals' | 'background'): string | null {
  const layer = row.plate.layers?.find((l) => l.role === role)
  return layer ? row.layer_films.find((f) => f.position === layer.position)?.colour ?? null : null
}

/**
 * The plates as the check sees them: each numerals placement with a side is a plate. A layered
 * plate carries its background: the colours are those of the films chosen for its layers. An
 * older plate of one artwork per colour has its background in the placement of the same
 * generated plate's background layer on the same side.
 * Sizes are measured on the revision's vector and scaled to the placement's width.
 */
export function placedPlates(rows: PlateRow[]): { row: PlateRow; plate: PlacedPlate }[] {
  const numerals = rows.filter((r) => r.plate.role === 'numerals' && r.side !== null)
  return numerals.map((row) => {
    const layered = row.plate.layers !== undefined
    const under = layered ? null : rows.find((b) => b.plate.role === 'background' && b.plate.group === row.plate.group && b.side === row.side)
    const m = row.plate.measured
    const scaled = scaleToPlacement({
      numeralHeightMm: m.tallestPieceMm, strokeMm: m.strokeMm, marginMm: m.marginMm,
      plateWidthMm: m.plateWidthMm ?? row.revision_width, plateHeightMm: m.plateHeightMm ?? row.revision_height,
    }, row.revision_width, row.width_mm)
    return {
      row,
      plate: {
        side: row.side as RobotSide, spot: row.spot, ...scaled,
        backgroundColour: layered ? layerColour(row, 'background') : under ? under.film_colour : null,
        numeralColour: layered ? layerColour(row, 'numerals') : row.film_colour,
        quantity: row.quantity, spares: row.spares,
      },
    }
  })
}

export async function robotPlateCheck(db: Db, actor: Actor, robot: RobotRow): Promise<RobotPlateCheck> {
  const [chosen, rows, kit] = await Promise.all([chosenProfile(db, robot.programId), platePlacements(db, robot.id), kitPlacements(db, robot.id)])
  const profile = chosen ? resolveProfile(chosen) : null
  const plates = placedPlates(rows)
  return {
    profile: chosen && profile
      ? { id: chosen.id, name: chosen.name, competition: profile.competition, season: profile.season, manual: profile.manual, notice: profile.notice }
      : null,
    results: profile ? checkRobotPlates(profile, plates.map((p) => p.plate)) : [],
    plates: plates.map(({ row, plate }) => ({
      placementId: row.id, side: plate.side, title: row.title, numeralHeightMm: plate.numeralHeightMm, strokeMm: plate.strokeMm,
      numeralColour: plate.numeralColour, backgroundColour: plate.backgroundColour,
    })),
    kitPlacements: kit.length,
    can: flags(actor, ['placement.reprint'], robot),
  }
}

export const EVENT_KIT_REASON = 'Event kit: spares to travel with the robot.'

/**
 * Queues spares of every plate layer placed on the robot and of every decal marked as needed
 * at events: one reprint job per placement, or per layer of a layered one (its spares, at least
 * one), gathered into one batch per film (a batch is cut from one film), all in one transaction:
 * the kit is queued whole or not at all. The caller has found the robot and checked `placement.reprint`.
 */
export async function queueEventKit(db: Db, actor: Actor, robot: RobotRow): Promise<EventKit> {
  return inTransaction(db, async (trx) => {
    // Lock the robot's placements so an edit at the same time waits for the kit.
    await trx.selectFrom('placement').select('id').where('robot_id', '=', robot.id).where('removed_at', 'is', null).forUpdate().execute()
    const rows = await kitPlacements(trx, robot.id)
    if (rows.length === 0) {
      throw createError({ statusCode: 409, message: 'Nothing on this robot goes in the event kit: place a plate, or mark a decal as needed at events.' })
    }
    const blocked = rows.find((r) => !r.film_cleared || r.film_retired)
    if (blocked) {
      throw createError({ statusCode: 422, message: `“${blocked.title}” is placed in ${blocked.film_name}, which may not be cut now: place it again in another film, then queue the kit.` })
    }
    const jobIds: number[] = []
    const films = new Map<number, { filmName: string; jobIds: number[]; copies: number }>()
    const quantityOf = (r: (typeof rows)[number]) => Math.max(r.spares, 1)
    // A layered decal is one job per layer, each in its layer's film: each joins its film's
    // batch. Queued together, so the operators get one mail for the whole kit.
    const queuedIds = await queueCuts(trx, actor, rows.map((r) => ({
      placementId: r.id, filmId: r.film_id, kind: 'reprint' as const, quantity: quantityOf(r), widthMm: r.width_mm, reason: EVENT_KIT_REASON,
      teamId: robot.teamId, robotId: robot.id, robotName: robot.name, title: r.title, spot: r.spot,
    })))
    for (const [i, r] of rows.entries()) {
      const queued = await trx.selectFrom('job').innerJoin('film', 'film.id', 'job.film_id').select(['job.id', 'job.film_id', 'film.name'])
        .where('job.id', 'in', queuedIds[i]!).orderBy('job.id').execute()
      for (const j of queued) {
        const film = films.get(j.film_id) ?? { filmName: j.name, jobIds: [], copies: 0 }
        jobIds.push(j.id)
        film.jobIds.push(j.id)
        film.copies += quantityOf(r)
        films.set(j.film_id, film)
      }
    }
    const batches: EventKit['batches'] = []
    for (const [filmId, f] of films) batches.push({ id: (await createBatch(trx, actor, f.jobIds)).id, filmId, ...f })
    return { jobIds, copies: batches.reduce((n, b) => n + b.copies, 0), batches }
  })
}
