import type { Selectable } from 'kysely'
import type { FilmTable } from '../db/schema'
import type { Db } from '../platform/db'

export function filmsOfProgram(db: Db, programId: number): Promise<Selectable<FilmTable>[]> {
  return db.selectFrom('film').selectAll().where('program_id', '=', programId).orderBy('retired').orderBy('name').execute()
}

export function filmOfProgram(db: Db, programId: number, id: number): Promise<Selectable<FilmTable> | undefined> {
  return db.selectFrom('film').selectAll().where('id', '=', id).where('program_id', '=', programId).executeTakeFirst()
}
