import { inject } from 'vitest'
import { createDb } from '../../server/db/connect'

let db: ReturnType<typeof createDb> | undefined
/** Direct access to the test database, for arranging cases and checking what was written. */
export function testDb() {
  db ??= createDb(inject('databaseUrl'), 2)
  return db
}
