import { createError } from 'h3'
import type { Selectable } from 'kysely'
import type { z } from 'zod'
import type { FilmTable } from '../db/schema'
import type { Film } from '#shared/types/films'
import type { filmPatchSchema, filmSchema } from '#shared/utils/schemas'
import { inTransaction, type Db } from '../platform/db'
import { fieldError } from '../platform/http'
import type { Actor } from '../policy'
import { audit, by } from '../history/service'
import { filmOfProgram, filmsOfProgram } from './queries'

export type FilmInput = z.output<typeof filmSchema>
export type FilmPatch = z.output<typeof filmPatchSchema>

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

export async function listFilms(db: Db, actor: Actor): Promise<Film[]> {
  return (await filmsOfProgram(db, actor.programId)).map(toFilm)
}

function columns(i: FilmPatch) {
  const c = {
    name: i.name, base_polymer: i.basePolymer, chlorine_free: i.chlorineFree, colour: i.colour, thickness_mm: i.thicknessMm,
    sheet_width_mm: i.sheetWidthMm, sheet_height_mm: i.sheetHeightMm, min_feature_mm: i.minFeatureMm,
    laser_power_pct: i.laserPowerPct, laser_speed_mm_s: i.laserSpeedMmS, laser_passes: i.laserPasses, retired: i.retired,
  }
  return Object.fromEntries(Object.entries(c).filter(([, v]) => v !== undefined)) as Partial<typeof c>
}

/** The database's own refusals, as answers a mentor can act on. */
function explain(err: unknown): never {
  const e = err as { code?: string; constraint?: string }
  if (e.constraint === 'film_polymer_not_chlorinated') {
    throw fieldError(400, 'A film made of PVC or another chlorinated polymer cannot be marked chlorine-free.', 'chlorineFree', 'This polymer contains chlorine.')
  }
  if (e.constraint === 'film_name_unique') throw fieldError(409, 'There is a film of that name already.', 'name')
  if (e.code === '23503' && /chlorine/.test(e.constraint ?? '')) {
    throw createError({ statusCode: 409, message: 'This film is on placements or cut jobs, so it cannot be marked as not chlorine-free. Retire it instead and check those decals.' })
  }
  throw err
}

export async function createFilm(db: Db, actor: Actor, input: FilmInput): Promise<Film> {
  try {
    return await inTransaction(db, async (trx) => {
      const row = await trx.insertInto('film').values({
        program_id: actor.programId, name: input.name, base_polymer: input.basePolymer, chlorine_free: input.chlorineFree, colour: input.colour,
        thickness_mm: input.thicknessMm, sheet_width_mm: input.sheetWidthMm, sheet_height_mm: input.sheetHeightMm, min_feature_mm: input.minFeatureMm,
        laser_power_pct: input.laserPowerPct, laser_speed_mm_s: input.laserSpeedMmS, laser_passes: input.laserPasses, retired: input.retired,
      }).returningAll().executeTakeFirstOrThrow()
      await audit(trx, { ...by(actor), action: 'add-film', subject: 'film', subjectId: row.id, detail: { name: row.name, chlorineFree: row.chlorine_free } })
      return toFilm(row)
    })
  } catch (err) { explain(err) }
}

/** 404 for a film of another program (the SQL where). */
export async function updateFilm(db: Db, actor: Actor, id: number, patch: FilmPatch): Promise<Film> {
  const set = columns(patch)
  try {
    return await inTransaction(db, async (trx) => {
      const row = Object.keys(set).length
        ? await trx.updateTable('film').set(set).where('id', '=', id).where('program_id', '=', actor.programId).returningAll().executeTakeFirst()
        : await filmOfProgram(trx, actor.programId, id)
      if (!row) throw createError({ statusCode: 404, message: 'No such film.' })
      await audit(trx, { ...by(actor), action: 'update-film', subject: 'film', subjectId: id, detail: { ...patch, name: row.name } })
      return toFilm(row)
    })
  } catch (err) { explain(err) }
}
