// Database access without Nuxt, for the server, the scripts and the tests.
import { Kysely, Migrator, PostgresDialect, type MigrationProvider } from 'kysely'
import pg from 'pg'
import type { Database } from './schema'
import { migrations } from './migrations'

// Return bigint counts and ids as numbers (our counts stay far below 2^53).
pg.types.setTypeParser(20, (v) => Number(v))

export function createDb(connectionString: string, max = 10): Kysely<Database> {
  return new Kysely<Database>({
    dialect: new PostgresDialect({ pool: new pg.Pool({ connectionString, max }) }),
  })
}

const provider: MigrationProvider = { getMigrations: async () => migrations }

/** Runs every pending migration; safe to call from several processes (Kysely takes a lock). */
export async function migrateToLatest(db: Kysely<Database>): Promise<string[]> {
  const migrator = new Migrator({ db, provider })
  const { error, results } = await migrator.migrateToLatest()
  if (error) throw error instanceof Error ? error : new Error(String(error))
  return (results ?? []).filter((r) => r.status === 'Success').map((r) => r.migrationName)
}
