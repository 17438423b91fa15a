// The work queue, kept in PostgreSQL by graphile-worker: jobs are added inside the caller's
// transaction (so a job exists exactly when the rows that asked for it commit), and any number
// of runners (the app's own, or `npm run worker` processes) take them. A job that throws is
// tried again later with graphile-worker's growing waits, up to its attempt limit.
import { EventEmitter } from 'node:events'
import os from 'node:os'
import pg from 'pg'
import { sql, type Kysely } from 'kysely'
import { Logger, run, runMigrations, type Runner, type TaskList, type WorkerEvents } from 'graphile-worker'
import type { Database } from '../db/schema'
import type { Db } from './db'

/**
 * Tries of one job before it is given up. graphile-worker waits e^n seconds after the n-th
 * failure, so three tries end within about 10 s: inside the time a request waits for its work,
 * so a revision that cannot be made is answered as a failure rather than left running.
 */
export const WORK_MAX_ATTEMPTS = 3
/** A runner that has not said it is alive for this long is taken for dead and its jobs handed on. */
const RUNNER_SILENT_AFTER_S = 30
const HEARTBEAT_MS = 5_000

// graphile-worker's own messages: warnings and errors only, in our log's words.
const logger = new Logger(() => (level, message) => {
  if (level === 'error' || level === 'warning') console.error(`[decalwright] work queue: ${message}`)
})

/** Installs or updates graphile-worker's schema (it takes a lock, so concurrent starts are safe). */
export async function installWorkQueue(connectionString: string): Promise<void> {
  await runMigrations({ connectionString, logger })
}

export interface JobSpec {
  /** Replaces a queued job with the same key; also the handle to cancel it by. */
  key: string
  maxAttempts?: number
  /** Lower runs first (graphile-worker's order). */
  priority?: number
}

/** Adds a job in the caller's transaction (or at once, given the database). */
export async function addJob(db: Db, task: string, payload: Record<string, unknown>, spec: JobSpec): Promise<void> {
  await sql`select (graphile_worker.add_job(${task}, ${JSON.stringify(payload)}::json,
    max_attempts => ${spec.maxAttempts ?? WORK_MAX_ATTEMPTS}::int, job_key => ${spec.key}::text,
    priority => ${spec.priority ?? 0}::int)).id`.execute(db)
}

/** Removes a job that no runner has taken yet; a running one is left to finish but never tried again. */
export async function removeJob(db: Db, key: string): Promise<void> {
  await sql`select graphile_worker.remove_job(${key}::text)`.execute(db)
}

export interface WorkRunner { stop: () => Promise<void> }

function alive(pid: number): boolean {
  try {
    process.kill(pid, 0)
    return true
  } catch (err) {
    return (err as NodeJS.ErrnoException).code === 'EPERM'
  }
}

/**
 * Hands on the jobs of runners that died (killed, crashed, or their machine gone): those not
 * heard from lately, and at once those on this machine whose process no longer exists.
 */
export async function releaseDeadRunners(db: Kysely<Database>): Promise<string[]> {
  const host = os.hostname()
  const rows = await db.selectFrom('work_runner').select(['worker_id', 'host', 'pid', 'seen_at']).execute()
  const silentBefore = Date.now() - RUNNER_SILENT_AFTER_S * 1000
  const dead = rows.filter((r) => new Date(r.seen_at).getTime() < silentBefore || (r.host === host && r.pid !== process.pid && !alive(r.pid)))
    .map((r) => r.worker_id)
  if (!dead.length) return []
  await sql`select graphile_worker.force_unlock_workers(${dead}::text[])`.execute(db)
  await db.deleteFrom('work_runner').where('worker_id', 'in', dead).execute()
  return dead
}

/**
 * Starts taking jobs for `tasks`, `concurrency` at a time. The runner registers its workers so
 * that a runner started later can tell when this one died; stop() lets running jobs finish.
 */
export async function startWorkRunner(db: Kysely<Database>, o: {
  connectionString: string
  tasks: TaskList
  concurrency: number
  /** Runs after each release of dead runners (at start and on every heartbeat), e.g. to give up what they left with no tries. */
  afterRelease?: () => Promise<unknown>
}): Promise<WorkRunner> {
  const mine = new Set<string>()
  const pending: Promise<unknown>[] = []
  const events: WorkerEvents = new EventEmitter()
  events.on('worker:create', ({ worker }) => {
    mine.add(worker.workerId)
    pending.push(db.insertInto('work_runner').values({ worker_id: worker.workerId, host: os.hostname(), pid: process.pid })
      .onConflict((oc) => oc.column('worker_id').doUpdateSet({ seen_at: new Date() })).execute())
  })
  await releaseDeadRunners(db)
  await o.afterRelease?.()
  const pgPool = new pg.Pool({ connectionString: o.connectionString, max: o.concurrency + 2 })
  pgPool.on('error', (err) => console.error('[decalwright] work queue connection lost:', err.message))
  let runner: Runner
  try {
    runner = await run({ pgPool, taskList: o.tasks, concurrency: o.concurrency, noHandleSignals: true, pollInterval: 2000, logger, events })
    await Promise.all(pending)
  } catch (err) {
    await pgPool.end()
    throw err
  }
  const beat = setInterval(() => {
    const ids = [...mine]
    void db.updateTable('work_runner').set({ seen_at: new Date() }).where('worker_id', 'in', ids).execute()
      .then(() => releaseDeadRunners(db))
      .then(() => o.afterRelease?.())
      .catch((err) => console.error('[decalwright] work queue heartbeat failed:', err instanceof Error ? err.message : err))
  }, HEARTBEAT_MS)
  beat.unref()
  return {
    stop: async () => {
      clearInterval(beat)
      await runner.stop()
      await db.deleteFrom('work_runner').where('worker_id', 'in', [...mine]).execute().catch(() => {})
      await pgPool.end()
    },
  }
}
