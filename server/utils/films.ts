import type { H3Event } from 'h3'
import type { Selectable } from 'kysely'
import type { FilmTable } from '../db/schema'
import type { Film } from '#shared/types/films'
import type { Actor } from './actor'

export const CHLORINE_REASON = 'Not chlorine-free: PVC ("vinyl") and other chlorinated plastics give off hydrogen chloride when lasered, which harms people and corrodes the machine. It can never be placed or cut.'

export function toFilm(r: Selectable<FilmTable>): Film {
  const notUsableBecause = !r.chlorine_free ? CHLORINE_REASON : r.retired ? 'Retired from the stock.' : null
  return {
    id: r.id, name: r.name, basePolymer: r.base_polymer, chlorineFree: r.chlorine_free, colour: r.colour,
    thicknessMm: r.thickness_mm, sheetWidthMm: r.sheet_width_mm, sheetHeightMm: r.sheet_height_mm, minFeatureMm: r.min_feature_mm,
    laserPowerPct: r.laser_power_pct, laserSpeedMmS: r.laser_speed_mm_s, laserPasses: r.laser_passes, retired: r.retired,
    usable: notUsableBecause === null, notUsableBecause,
  }
}

export async function listFilms(actor: Actor): Promise<Film[]> {
  const rows = await useDb().selectFrom('film').selectAll().where('program_id', '=', actor.programId).orderBy('retired').orderBy('name').execute()
  return rows.map(toFilm)
}

type FilmInput = { name?: string; basePolymer?: string; chlorineFree?: boolean; colour?: string; thicknessMm?: number; sheetWidthMm?: number; sheetHeightMm?: number; minFeatureMm?: number; laserPowerPct?: number; laserSpeedMmS?: number; laserPasses?: number; retired?: boolean }

function columns(i: FilmInput) {
  const c = {
    name: i.name, base_polymer: i.basePolymer, chlorine_free: i.chlorineFree, colour: i.colour, thickness_mm: i.thicknessMm,
    sheet_width_mm: i.sheetWidthMm, sheet_height_mm: i.sheetHeightMm, min_feature_mm: i.minFeatureMm,
    laser_power_pct: i.laserPowerPct, laser_speed_mm_s: i.laserSpeedMmS, laser_passes: i.laserPasses, retired: i.retired,
  }
  return Object.fromEntries(Object.entries(c).filter(([, v]) => v !== undefined))
}

/** The database's own refusals, as answers a mentor can act on. */
function explain(err: unknown): never {
  const e = err as { code?: string; constraint?: string }
  if (e.constraint === 'film_polymer_not_chlorinated') {
    throw createError({ statusCode: 400, message: 'A film made of PVC or another chlorinated polymer cannot be marked chlorine-free.', data: { fieldErrors: { chlorineFree: ['This polymer contains chlorine.'] } } })
  }
  if (e.constraint === 'film_name_unique') throw createError({ statusCode: 409, message: 'There is a film of that name already.', data: { fieldErrors: { name: ['There is a film of that name already.'] } } })
  if (e.code === '23503' && /chlorine/.test(e.constraint ?? '')) {
    throw createError({ statusCode: 409, message: 'This film is on placements or cut jobs, so it cannot be marked as not chlorine-free. Retire it instead and check those decals.' })
  }
  throw err
}

export async function createFilm(event: H3Event, actor: Actor, input: Required<Omit<FilmInput, 'retired'>> & { retired: boolean }): Promise<Film> {
  try {
    return await useDb().transaction().execute(async (trx) => {
      const row = await trx.insertInto('film').values({ program_id: actor.programId, ...columns(input) } as never).returningAll().executeTakeFirstOrThrow()
      await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'add-film', subjectType: 'film', subjectId: row.id, detail: { name: row.name, chlorineFree: row.chlorine_free } })
      return toFilm(row)
    })
  } catch (err) { explain(err) }
}

export async function updateFilm(event: H3Event, actor: Actor, id: number, input: FilmInput): Promise<Film> {
  const set = columns(input)
  try {
    return await useDb().transaction().execute(async (trx) => {
      const row = Object.keys(set).length
        ? await trx.updateTable('film').set(set).where('id', '=', id).where('program_id', '=', actor.programId).returningAll().executeTakeFirst()
        : await trx.selectFrom('film').selectAll().where('id', '=', id).where('program_id', '=', actor.programId).executeTakeFirst()
      if (!row) throw createError({ statusCode: 404, message: 'No such film.' })
      await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'update-film', subjectType: 'film', subjectId: id, detail: { name: row.name, ...input } })
      return toFilm(row)
    })
  } catch (err) { explain(err) }
}
