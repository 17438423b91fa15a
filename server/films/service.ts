// The film library: films chosen from the polymer register, the lab's approval for a polymer it
// must judge, test cuts on this program's laser, and the sheets on the shelf.
import { createError } from 'h3'
import { sql, type Transaction } from 'kysely'
import type { z } from 'zod'
import type { Database } from '../db/schema'
import type { Film, FilmDetail, FilmTest, PolymerView, StockEvent, TestGridRecord } from '#shared/types/films'
import type { filmPatchSchema, filmSchema, filmStockSchema, labApprovalSchema } from '#shared/utils/schemas'
import { beamCaution, DEFAULT_KERF_MM } from '#shared/films/library'
import { polymerByCode, searchPolymers } from '#shared/films/polymers'
import { inTransaction, type Db } from '../platform/db'
import { fieldError } from '../platform/http'
import { flags, type Actor } from '../policy'
import { audit, by } from '../history/service'
import { filmInUse, filmOfProgram, filmsOfProgram, filmTests, polymerRows, stockEvents, type FilmRow, type FilmTestRow } from './queries'

export type FilmInput = z.output<typeof filmSchema>
export type FilmPatch = z.output<typeof filmPatchSchema>

const iso = (t: Date | string) => new Date(t).toISOString()

function toTest(t: FilmTestRow): FilmTest {
  return {
    id: t.id, at: iso(t.tested_at), by: t.by, grid: t.grid as TestGridRecord, square: t.square, result: t.square ? 'clean' : 'none-clean',
    powerPct: t.power_pct, speedMmS: t.speed_mm_s, passes: t.passes, kerfMm: t.kerf_mm, note: t.note,
  }
}

/** Why a film may not be placed or cut now, in a sentence; null when it may. */
export function notUsableBecause(r: Pick<FilmRow, 'cleared' | 'polymer_verdict' | 'polymer_name' | 'polymer_why' | 'retired' | 'retired_reason'>): string | null {
  if (!r.cleared) {
    return r.polymer_verdict === 'never'
      ? `${r.polymer_name}: ${r.polymer_why}`
      : `${r.polymer_name} needs the lab's approval for this film, recorded by a mentor with the safety data sheet it was judged on. ${r.polymer_why}`
  }
  if (r.retired) return r.retired_reason ? `Retired from the stock: ${r.retired_reason}` : 'Retired from the stock.'
  return null
}

export function toFilm(r: FilmRow): Film {
  const polymer: PolymerView = {
    code: r.polymer_code, name: r.polymer_name, names: r.polymer_names, halogens: r.polymer_halogens, chlorineFree: r.polymer_chlorine_free,
    verdict: r.polymer_verdict, why: r.polymer_why, sources: r.polymer_sources,
  }
  const lastTest = r.last_test ? toTest(r.last_test as unknown as FilmTestRow) : null
  const why = notUsableBecause(r)
  return {
    id: r.id, name: r.name, polymer, chlorineFree: r.polymer_chlorine_free, cleared: r.cleared,
    labApproval: r.lab_approved_at ? { by: r.approver_name ?? 'a mentor', at: iso(r.lab_approved_at), safetyDataSheet: r.lab_approval_sds ?? '' } : null,
    colour: r.colour, colourHex: r.colour_hex, opacity: r.opacity,
    thicknessMm: r.thickness_mm, sheetWidthMm: r.sheet_width_mm, sheetHeightMm: r.sheet_height_mm, minFeatureMm: r.min_feature_mm,
    kerfMm: r.kerf_mm ?? DEFAULT_KERF_MM, kerfMeasured: r.kerf_mm !== null,
    laserPowerPct: r.laser_power_pct, laserSpeedMmS: r.laser_speed_mm_s, laserPasses: r.laser_passes,
    lastTest, beamCaution: beamCaution({ opacity: r.opacity, colourHex: r.colour_hex, colour: r.colour, tested: lastTest !== null }),
    sheetsOnHand: r.sheets_on_hand, retired: r.retired, retiredReason: r.retired_reason,
    usable: why === null, notUsableBecause: why,
  }
}

export async function listFilms(db: Db, actor: Actor): Promise<Film[]> {
  return (await filmsOfProgram(db, actor.programId)).map(toFilm)
}

function notFound(): never {
  throw createError({ statusCode: 404, message: 'No such film.' })
}

export async function findFilm(db: Db, actor: Actor, id: number): Promise<FilmRow> {
  return (await filmOfProgram(db, actor.programId, id)) ?? notFound()
}

/** The film's page: the film, its test cuts, its stock's history and whether it is in use. */
export async function filmDetail(db: Db, actor: Actor, id: number): Promise<FilmDetail> {
  const row = await findFilm(db, actor, id)
  const [tests, stock, inUse] = await Promise.all([filmTests(db, id), stockEvents(db, id), filmInUse(db, id)])
  return {
    ...toFilm(row),
    tests: tests.map(toTest),
    stock: stock.map((e): StockEvent => ({ id: e.id, at: iso(e.at), by: e.by, kind: e.kind, change: e.change, onHand: e.on_hand, jobId: e.job_id, note: e.note })),
    inUse,
    can: flags(actor, ['film.manage', 'film.test']),
  }
}

/** The register, or the entries a search names (any common name, as the mentor types). */
export async function listPolymers(db: Db, q?: string): Promise<PolymerView[]> {
  const rows = await polymerRows(db)
  const order = q ? searchPolymers(q).map((p) => p.code) : null
  const byCode = new Map(rows.map((r) => [r.code, r]))
  const picked = order ? order.map((c) => byCode.get(c)).filter((r) => r !== undefined) : rows
  return picked.map((r) => ({ code: r.code, name: r.name, names: r.names, halogens: r.halogens, chlorineFree: r.chlorine_free, verdict: r.verdict, why: r.why, sources: r.sources }))
}

function columns(i: FilmPatch) {
  const verdict = i.polymerCode ? polymerByCode(i.polymerCode)?.verdict : undefined
  const c = {
    name: i.name, polymer_code: i.polymerCode, polymer_verdict: verdict, colour: i.colour, colour_hex: i.colourHex, opacity: i.opacity,
    thickness_mm: i.thicknessMm, sheet_width_mm: i.sheetWidthMm, sheet_height_mm: i.sheetHeightMm, min_feature_mm: i.minFeatureMm, kerf_mm: i.kerfMm,
    laser_power_pct: i.laserPowerPct, laser_speed_mm_s: i.laserSpeedMmS, laser_passes: i.laserPasses, retired: i.retired,
    retired_reason: i.retired === false ? null : i.retired ? (i.retiredReason || null) : undefined,
  }
  return Object.fromEntries(Object.entries(c).filter(([, v]) => v !== undefined)) as Partial<typeof c>
}

/** The database's own refusals, as answers a mentor can act on. */
function explain(err: unknown): never {
  const e = err as { code?: string; constraint?: string }
  if (e.constraint === 'film_name_unique') throw fieldError(409, 'There is a film of that name already.', 'name')
  if (e.constraint === 'film_polymer') throw fieldError(400, 'Choose what the film is made of from the register.', 'polymerCode')
  if (e.code === '23503' && /_film_cleared$/.test(e.constraint ?? '')) {
    throw createError({ statusCode: 409, message: 'This film is on placements or cut jobs, so it must stay cleared for cutting. Retire it instead and check those decals.' })
  }
  throw err
}

export async function createFilm(db: Db, actor: Actor, input: FilmInput): Promise<Film> {
  const polymer = polymerByCode(input.polymerCode)!
  try {
    return await inTransaction(db, async (trx) => {
      const row = await trx.insertInto('film').values({
        program_id: actor.programId, name: input.name, polymer_code: polymer.code, polymer_verdict: polymer.verdict,
        colour: input.colour, colour_hex: input.colourHex, opacity: input.opacity,
        thickness_mm: input.thicknessMm, sheet_width_mm: input.sheetWidthMm, sheet_height_mm: input.sheetHeightMm, min_feature_mm: input.minFeatureMm,
        kerf_mm: input.kerfMm, laser_power_pct: input.laserPowerPct, laser_speed_mm_s: input.laserSpeedMmS, laser_passes: input.laserPasses,
        sheets_on_hand: input.sheetsOnHand, retired: input.retired,
      }).returning('id').executeTakeFirstOrThrow()
      await audit(trx, { ...by(actor), action: 'add-film', subject: 'film', subjectId: row.id, detail: { name: input.name, polymer: polymer.code } })
      if (input.sheetsOnHand > 0) await stockLine(trx, actor, row.id, { kind: 'count', change: input.sheetsOnHand, onHand: input.sheetsOnHand, note: 'On the shelf when the film was added.' })
      return toFilm((await filmOfProgram(trx, actor.programId, row.id))!)
    })
  } catch (err) { explain(err) }
}

/** Changes the film's fields. Its polymer may change only while nothing uses the film. 404 for another program's film. */
export async function updateFilm(db: Db, actor: Actor, id: number, patch: FilmPatch): Promise<Film> {
  const set = columns(patch)
  try {
    return await inTransaction(db, async (trx) => {
      const before = await findFilm(trx, actor, id)
      if (set.polymer_code && set.polymer_code !== before.polymer_code && await filmInUse(trx, id)) {
        throw fieldError(409, 'This film is on placements or cut jobs: its polymer stays as it was. Add a new film for the other material.', 'polymerCode', 'In use: add a new film instead.')
      }
      if (Object.keys(set).length) await trx.updateTable('film').set(set).where('id', '=', id).where('program_id', '=', actor.programId).execute()
      const changed = Object.fromEntries(Object.entries(patch).filter(([k, v]) => v !== undefined && k !== 'name'))
      await audit(trx, { ...by(actor), action: 'update-film', subject: 'film', subjectId: id, detail: { ...changed, name: patch.name ?? before.name } })
      return toFilm((await filmOfProgram(trx, actor.programId, id))!)
    })
  } catch (err) { explain(err) }
}

/** A mentor records the lab's approval of an ask-the-lab polymer for this film. The caller has checked `film.manage`. */
export async function approveFilm(db: Db, actor: Actor, id: number, input: z.output<typeof labApprovalSchema>): Promise<Film> {
  return inTransaction(db, async (trx) => {
    const film = await findFilm(trx, actor, id)
    if (film.polymer_verdict !== 'ask-the-lab') {
      throw createError({
        statusCode: 422,
        message: film.polymer_verdict === 'never' ? `${film.polymer_name} can never be cleared for cutting, whatever the lab says. ${film.polymer_why}` : `${film.polymer_name} needs no approval: it is allowed.`,
      })
    }
    await trx.updateTable('film').set({ lab_approved_by: actor.id, lab_approved_at: sql<Date>`now()`, lab_approval_sds: input.safetyDataSheet }).where('id', '=', id).execute()
    await audit(trx, { ...by(actor), action: 'approve-film', subject: 'film', subjectId: id, detail: { name: film.name, polymer: film.polymer_code, safetyDataSheet: input.safetyDataSheet } })
    return toFilm((await filmOfProgram(trx, actor.programId, id))!)
  })
}

/** Withdraws the lab's approval; refused while placements or jobs use the film (the database's key). */
export async function withdrawApproval(db: Db, actor: Actor, id: number): Promise<Film> {
  try {
    return await inTransaction(db, async (trx) => {
      const film = await findFilm(trx, actor, id)
      if (!film.lab_approved_at) throw createError({ statusCode: 409, message: 'This film has no approval to withdraw.' })
      await trx.updateTable('film').set({ lab_approved_by: null, lab_approved_at: null, lab_approval_sds: null }).where('id', '=', id).execute()
      await audit(trx, { ...by(actor), action: 'withdraw-film-approval', subject: 'film', subjectId: id, detail: { name: film.name, polymer: film.polymer_code } })
      return toFilm((await filmOfProgram(trx, actor.programId, id))!)
    })
  } catch (err) { explain(err) }
}

// ---------- stock ----------

async function stockLine(trx: Transaction<Database>, actor: Actor, filmId: number, e: { kind: StockEvent['kind']; change: number; onHand: number; jobId?: number; note: string }) {
  await trx.insertInto('film_stock_event').values({ film_id: filmId, kind: e.kind, change: e.change, on_hand: e.onHand, job_id: e.jobId ?? null, note: e.note, by_user: actor.id }).execute()
}

/** A mentor records a delivery (sheets added) or a count of the shelf (sheets set). The caller has checked `film.manage`. */
export async function recordStock(db: Db, actor: Actor, id: number, input: z.output<typeof filmStockSchema>): Promise<FilmDetail> {
  await inTransaction(db, async (trx) => {
    const film = await findFilm(trx, actor, id)
    const onHand = input.kind === 'delivery' ? film.sheets_on_hand + input.sheets : input.sheets
    await trx.updateTable('film').set({ sheets_on_hand: onHand }).where('id', '=', id).execute()
    await stockLine(trx, actor, id, { kind: input.kind, change: onHand - film.sheets_on_hand, onHand, note: input.note })
    await audit(trx, { ...by(actor), action: 'film-stock', subject: 'film', subjectId: id, detail: { name: film.name, kind: input.kind, sheets: input.sheets, onHand, note: input.note } })
  })
  return filmDetail(db, actor, id)
}

/**
 * Takes the sheets a cut used off the shelf, inside the cut's transaction. The shelf never goes
 * below zero: a shortfall means the count was wrong, and the answer says so.
 */
export async function takeSheets(trx: Transaction<Database>, actor: Actor, o: { filmId: number; sheets: number; jobId: number; kind: 'cut' | 'failed-cut' }): Promise<{ onHand: number; short: number }> {
  const film = await trx.selectFrom('film').select('sheets_on_hand').where('id', '=', o.filmId).forUpdate().executeTakeFirstOrThrow()
  const taken = Math.min(film.sheets_on_hand, o.sheets)
  const onHand = film.sheets_on_hand - taken
  const short = o.sheets - taken
  await trx.updateTable('film').set({ sheets_on_hand: onHand }).where('id', '=', o.filmId).execute()
  const note = short > 0 ? `The job used ${o.sheets} sheet${o.sheets === 1 ? '' : 's'} but the stock said ${film.sheets_on_hand}: count the shelf.` : ''
  if (o.sheets > 0) await stockLine(trx, actor, o.filmId, { kind: o.kind, change: -taken, onHand, jobId: o.jobId, note })
  return { onHand, short }
}
