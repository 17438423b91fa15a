import { jsonObjectFrom } from 'kysely/helpers/postgres'
import type { Db } from '../platform/db'

const TEST_COLUMNS = ['film_test.id', 'film_test.film_id', 'film_test.tested_at', 'film_test.grid', 'film_test.square', 'film_test.power_pct', 'film_test.speed_mm_s',
  'film_test.passes', 'film_test.kerf_mm', 'film_test.note', 'tester.name as by'] as const

/** A film's test cuts, with who made them. */
function testsOf(db: Db) {
  return db.selectFrom('film_test').innerJoin('users as tester', 'tester.id', 'film_test.tested_by').select(TEST_COLUMNS)
}

export type FilmTestRow = Awaited<ReturnType<ReturnType<typeof testsOf>['executeTakeFirstOrThrow']>>

/** The film's own columns with its register entry, the lab's approver and its latest test, in one row. */
function filmsWithRegister(db: Db) {
  return db.selectFrom('film')
    .innerJoin('polymer', 'polymer.code', 'film.polymer_code')
    .leftJoin('users as approver', 'approver.id', 'film.lab_approved_by')
    .selectAll('film')
    .select((eb) => [
      'polymer.name as polymer_name', 'polymer.names as polymer_names', 'polymer.halogens as polymer_halogens', 'polymer.chlorine_free as polymer_chlorine_free',
      'polymer.why as polymer_why', 'polymer.sources as polymer_sources', 'approver.name as approver_name',
      jsonObjectFrom(eb.selectFrom('film_test').innerJoin('users as tester', 'tester.id', 'film_test.tested_by').select(TEST_COLUMNS)
        .whereRef('film_test.film_id', '=', 'film.id').orderBy('film_test.id', 'desc').limit(1)).as('last_test'),
    ])
}

export type FilmRow = Awaited<ReturnType<ReturnType<typeof filmsWithRegister>['executeTakeFirstOrThrow']>>

export function filmsOfProgram(db: Db, programId: number): Promise<FilmRow[]> {
  return filmsWithRegister(db).where('film.program_id', '=', programId).orderBy('film.retired').orderBy('film.name').execute()
}

export function filmOfProgram(db: Db, programId: number, id: number): Promise<FilmRow | undefined> {
  return filmsWithRegister(db).where('film.id', '=', id).where('film.program_id', '=', programId).executeTakeFirst()
}

export function filmTests(db: Db, filmId: number): Promise<FilmTestRow[]> {
  return testsOf(db).where('film_test.film_id', '=', filmId).orderBy('film_test.id', 'desc').execute()
}

export function stockEvents(db: Db, filmId: number, limit = 50) {
  return db.selectFrom('film_stock_event').innerJoin('users', 'users.id', 'film_stock_event.by_user')
    .select(['film_stock_event.id', 'film_stock_event.at', 'film_stock_event.kind', 'film_stock_event.change', 'film_stock_event.on_hand',
      'film_stock_event.job_id', 'film_stock_event.note', 'users.name as by'])
    .where('film_stock_event.film_id', '=', filmId).orderBy('film_stock_event.id', 'desc').limit(limit).execute()
}

/** Whether any placement or job uses the film: then its polymer and the lab's approval stay as they are. */
export async function filmInUse(db: Db, filmId: number): Promise<boolean> {
  const row = await db.selectFrom('placement').select('id').where('film_id', '=', filmId)
    .union(db.selectFrom('job').select('id').where('film_id', '=', filmId)).limit(1).executeTakeFirst()
  return !!row
}

export function polymerRows(db: Db) {
  return db.selectFrom('polymer').selectAll().orderBy('code').execute()
}
