// Database access without Nuxt, for the server, the scripts and the tests.
import { Kysely, Migrator, PostgresDialect, type MigrationProvider, type PostgresPool, type PostgresPoolClient } from 'kysely'
import pg from 'pg'
import { databaseFault, ServiceUnavailable } from '../platform/faults'
import type { Database } from './schema'
import { migrations } from './migrations'

// Return bigint counts and ids as numbers (our counts stay far below 2^53).
pg.types.setTypeParser(20, (v) => Number(v))

export interface DbOptions {
  /** Connections in the pool. */
  max?: number
  /** How long a request waits for a free connection before it is answered 503. */
  connectTimeoutMs?: number
  /** How long one query may take, counted by the client, so a stalled server cannot hang a request. */
  queryTimeoutMs?: number
}

export const DB_DEFAULTS = { max: 10, connectTimeoutMs: 5000, queryTimeoutMs: 15_000 } as const

export function createDb(connectionString: string, options: DbOptions | number = {}): Kysely<Database> {
  const given = typeof options === 'number' ? { max: options } : options
  const o = { ...DB_DEFAULTS, ...Object.fromEntries(Object.entries(given).filter(([, v]) => v !== undefined)) }
  const pool = new pg.Pool({
    connectionString,
    max: o.max,
    connectionTimeoutMillis: o.connectTimeoutMs,
    query_timeout: o.queryTimeoutMs,
    // The server gives up too, and ends a transaction left open by a request that died.
    statement_timeout: o.queryTimeoutMs,
    idle_in_transaction_session_timeout: o.queryTimeoutMs * 2,
    // Dead connections (a restarted or stalled server) are noticed instead of waited on.
    keepAlive: true,
  })
  // An idle connection that breaks must not take the process down with it.
  pool.on('error', (err) => console.error('[decalwright] database connection lost:', err.message))
  return new Kysely<Database>({ dialect: new PostgresDialect({ pool: guarded(pool) }) })
}

/**
 * The pool as Kysely sees it, with two promises kept in one place: a database that cannot be
 * reached, has no free connection or does not answer in time throws ServiceUnavailable (the
 * app answers 503), and a connection that timed out is closed rather than handed to the next
 * request (it may still be inside a half-done transaction or owe an answer to a query).
 */
function guarded(pool: pg.Pool): PostgresPool {
  const clients = new WeakMap<pg.PoolClient, { wrapper: PostgresPoolClient; broken: boolean }>()
  const wrap = (client: pg.PoolClient) => {
    const state = { broken: false, wrapper: undefined as unknown as PostgresPoolClient }
    const query = client.query.bind(client) as (...args: unknown[]) => unknown
    state.wrapper = {
      query: ((...args: unknown[]) => {
        const result = query(...args)
        if (!(result instanceof Promise)) return result // a cursor
        return result.catch((err: unknown) => {
          const fault = databaseFault(err)
          if (fault instanceof ServiceUnavailable) state.broken = true
          throw fault
        })
      }) as PostgresPoolClient['query'],
      release: (destroy?: boolean) => {
        const drop = destroy || state.broken
        state.broken = false
        if (drop) clients.delete(client)
        client.release(drop || undefined)
      },
    }
    clients.set(client, state)
    return state.wrapper
  }
  return {
    async connect() {
      let client: pg.PoolClient
      try {
        client = await pool.connect()
      } catch (err) {
        throw databaseFault(err)
      }
      return clients.get(client)?.wrapper ?? wrap(client)
    },
    end: () => pool.end(),
  }
}

const provider: MigrationProvider = { getMigrations: async () => migrations }

/** Runs every pending migration; safe to call from several processes (Kysely takes a lock). */
export async function migrateToLatest(db: Kysely<Database>): Promise<string[]> {
  const migrator = new Migrator({ db, provider })
  const { error, results } = await migrator.migrateToLatest()
  if (error) throw error instanceof Error ? error : new Error(String(error))
  return (results ?? []).filter((r) => r.status === 'Success').map((r) => r.migrationName)
}
