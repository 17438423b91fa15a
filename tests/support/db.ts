import { sql } from 'kysely'
import { inject } from 'vitest'
import { createDb } from '../../server/db/connect'

let db: ReturnType<typeof createDb> | undefined
/** Direct access to the test database, for arranging cases and checking what was written. */
export function testDb() {
  db ??= createDb(inject('databaseUrl'), 2)
  return db
}

let fresh = 0
/** A new, empty database in the test cluster with the migrations and the demo program, for an app of its own. */
export async function freshDatabase(tag: string): Promise<string> {
  const { migrateToLatest } = await import('../../server/db/connect')
  const { loadDemo } = await import('../../server/db/demo')
  const name = `t_${tag.replace(/\W+/g, '_').toLowerCase()}_${process.pid}_${fresh++}`
  await sql`create database ${sql.id(name)}`.execute(testDb())
  const url = new URL(inject('databaseUrl'))
  url.pathname = `/${name}`
  const db = createDb(url.toString(), 1)
  await migrateToLatest(db)
  await loadDemo(db)
  await db.destroy()
  return url.toString()
}
