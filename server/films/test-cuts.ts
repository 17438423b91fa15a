// A film's test grid on this program's laser: the cut sheet of squares at many powers and
// speeds, and the record of which square weeded cleanly, which becomes the film's laser settings.
import { createError } from 'h3'
import type { z } from 'zod'
import type { TestGridPlan } from '#shared/types/films'
import type { filmTestSchema, testGridSchema } from '#shared/utils/schemas'
import { testGrid, type TestGrid } from '../cutsheet/test-grid'
import { fileSlug } from '../platform/file-names'
import { inTransaction, type Db } from '../platform/db'
import { fieldError } from '../platform/http'
import type { Actor } from '../policy'
import { audit, by } from '../history/service'
import type { FilmRow } from './queries'
import { filmDetail, findFilm } from './service'

export type GridInput = z.output<typeof testGridSchema>

/** The grid for the film's sheet; a range the grid cannot hold, or a grid the sheet cannot, is a 422 saying what to change. */
export function gridFor(film: Pick<FilmRow, 'sheet_width_mm' | 'sheet_height_mm'>, g: GridInput): TestGrid {
  try {
    return testGrid({ power: g.power, speed: g.speed, squareMm: g.squareMm, sheetWidthMm: film.sheet_width_mm, sheetHeightMm: film.sheet_height_mm })
  } catch (err) {
    if (err instanceof RangeError) throw createError({ statusCode: 422, message: err.message })
    throw err
  }
}

export function gridPlan(film: FilmRow, g: GridInput): TestGridPlan {
  const grid = gridFor(film, g)
  return { widthMm: grid.widthMm, heightMm: grid.heightMm, rows: grid.rows, columns: grid.columns, passes: g.passes }
}

export function gridFile(film: FilmRow, g: GridInput, format: 'svg' | 'dxf'): { files: string[]; name: string } {
  const grid = gridFor(film, g)
  return { files: [grid[format]], name: `test-grid-${fileSlug(film.name, 40, 'film')}-p${g.power.from}-${g.power.to}-s${g.speed.from}-${g.speed.to}` }
}

/**
 * Records a test cut made from the grid `input.grid`: the square that weeded cleanly (its power
 * and speed read from the same grid, so the record says exactly what the file said) becomes the
 * film's laser settings, with the grid's passes; a measured kerf becomes the film's kerf. The
 * caller has checked `film.test`.
 */
export async function recordTest(db: Db, actor: Actor, id: number, input: z.output<typeof filmTestSchema>) {
  await inTransaction(db, async (trx) => {
    const film = await findFilm(trx, actor, id)
    const grid = gridFor(film, input.grid)
    const square = input.square ? grid.squares.find((s) => s.label === input.square) : null
    if (input.square && !square) {
      throw fieldError(400, `There is no square ${input.square} on this grid: its squares run from A1 to ${grid.squares.at(-1)!.label}.`, 'square', 'Not on this grid.')
    }
    await trx.insertInto('film_test').values({
      film_id: id, tested_by: actor.id, grid: JSON.stringify(input.grid), square: square?.label ?? null,
      power_pct: square?.powerPercent ?? null, speed_mm_s: square?.speedMmS ?? null, passes: input.grid.passes, kerf_mm: input.kerfMm, note: input.note,
    }).execute()
    const settings = square ? { laser_power_pct: square.powerPercent, laser_speed_mm_s: square.speedMmS, laser_passes: input.grid.passes } : {}
    const kerf = input.kerfMm !== null ? { kerf_mm: input.kerfMm } : {}
    if (square || input.kerfMm !== null) await trx.updateTable('film').set({ ...settings, ...kerf }).where('id', '=', id).execute()
    await audit(trx, {
      ...by(actor), action: 'test-film', subject: 'film', subjectId: id,
      detail: { name: film.name, square: square?.label ?? null, powerPct: square?.powerPercent ?? null, speedMmS: square?.speedMmS ?? null, passes: input.grid.passes, kerfMm: input.kerfMm },
    })
  })
  return filmDetail(db, actor, id)
}
