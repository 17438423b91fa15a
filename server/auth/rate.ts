// Counts in fixed windows, kept in PostgreSQL so they hold across app processes. A count is
// raised and read in one statement (an upsert), so a hundred requests at once each see their
// own number: no two can both read "4" and both go ahead under a limit of 5.
import { sql } from 'kysely'
import type { Db } from '../platform/db'

export interface Counted {
  /** The count after this request's share was added. */
  count: number
  /** Seconds until the window ends and the count starts again. */
  retryAfterSeconds: number
}

export async function raiseCount(db: Db, key: string, windowMs: number): Promise<Counted> {
  const window = `${windowMs} milliseconds`
  const { rows } = await sql<{ count: number; window_started_at: Date }>`
    insert into rate_count as r (key, window_started_at, count) values (${key}, now(), 1)
    on conflict (key) do update set
      count = case when r.window_started_at <= now() - ${window}::interval then 1 else r.count + 1 end,
      window_started_at = case when r.window_started_at <= now() - ${window}::interval then now() else r.window_started_at end
    returning count, window_started_at`.execute(db)
  const row = rows[0]!
  return { count: row.count, retryAfterSeconds: Math.max(1, Math.ceil((new Date(row.window_started_at).getTime() + windowMs - Date.now()) / 1000)) }
}

/** Takes back one count (an attempt that turned out not to count, such as the right password). */
export async function lowerCount(db: Db, key: string): Promise<void> {
  await db.updateTable('rate_count').set({ count: sql`greatest(count - 1, 0)` }).where('key', '=', key).execute()
}

export async function forgetCount(db: Db, key: string): Promise<void> {
  await db.deleteFrom('rate_count').where('key', '=', key).execute()
}
