import type { Kysely } from 'kysely'
import { createDb, migrateToLatest } from '../db/connect'
import type { Database } from '../db/schema'

let db: Kysely<Database> | undefined
let ready: Promise<unknown> | undefined

export function useDb(): Kysely<Database> {
  if (!db) {
    const url = useRuntimeConfig().databaseUrl
    if (!url) throw new Error('NUXT_DATABASE_URL is not set: the app needs a PostgreSQL connection string.')
    db = createDb(url)
  }
  return db
}

/** Migrations run once per process at start-up; requests wait for them. */
export function dbReady(): Promise<unknown> {
  ready ??= migrateToLatest(useDb()).catch((err) => {
    ready = undefined
    throw err
  })
  return ready
}
