import { sql, type Kysely, type Transaction } from 'kysely'
import { createDb, migrateToLatest } from '../db/connect'
import type { Database } from '../db/schema'
import { platformConfig } from './config'
import { installWorkQueue } from './work-queue'

/**
 * The database or a transaction on it. Every query and service takes one of these as its
 * first argument and uses nothing else, so work inside a transaction never reaches for a
 * second pool connection (which deadlocks the pool under a burst of parallel requests).
 * Only routes (and start-up) call useDb().
 */
export type Db = Kysely<Database> | Transaction<Database>

let db: Kysely<Database> | undefined
let ready: Promise<unknown> | undefined

export function useDb(): Kysely<Database> {
  if (!db) {
    const url = platformConfig().databaseUrl
    if (!url) throw new Error('NUXT_DATABASE_URL is not set: the app needs a PostgreSQL connection string.')
    db = createDb(url, { queryTimeoutMs: platformConfig().dbQueryTimeoutMs || undefined })
  }
  return db
}

/** Migrations (ours, then the work queue's) run once per process at start-up; requests wait for them. */
export function dbReady(): Promise<unknown> {
  ready ??= migrateToLatest(useDb()).then(() => installWorkQueue(platformConfig().databaseUrl)).catch((err) => {
    ready = undefined
    throw err
  })
  return ready
}

let savepoints = 0

/**
 * Runs `work` in a transaction: a new one on the database, or a savepoint inside the
 * transaction it is given, so a service keeps its all-or-nothing promise when a caller (or a
 * test) has already opened one.
 */
export async function inTransaction<T>(db: Db, work: (trx: Transaction<Database>) => Promise<T>): Promise<T> {
  if (!db.isTransaction) return db.transaction().execute(work)
  const trx = db as Transaction<Database>
  const name = sql.raw(`dw_savepoint_${++savepoints}`)
  await sql`savepoint ${name}`.execute(trx)
  try {
    const result = await work(trx)
    await sql`release savepoint ${name}`.execute(trx)
    return result
  } catch (err) {
    await sql`rollback to savepoint ${name}`.execute(trx)
    throw err
  }
}
