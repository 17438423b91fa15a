// Background work that one app process at a time should do now and then (sweeping stored files
// nothing points at, forgetting old answers). Every process keeps a timer; at each tick the
// process that moves the task's last_run_at forward in one statement does the work, so several
// processes behind a load balancer share it instead of repeating it.
import { sql } from 'kysely'
import type { Db } from './db'

/** Whether this process takes the task's turn now: true for one process per interval. */
export async function takeTurn(db: Db, task: string, intervalS: number): Promise<boolean> {
  const r = await sql<{ task: string }>`
    insert into housekeeping (task, last_run_at) values (${task}, now())
    on conflict (task) do update set last_run_at = now()
      where housekeeping.last_run_at <= now() - make_interval(secs => ${intervalS})
    returning task`.execute(db)
  return r.rows.length > 0
}

/** Runs `work` about every `intervalS` seconds in one of the app's processes; returns a stop function. */
export function everyInterval(db: Db, o: { task: string; intervalS: number; ready: () => Promise<unknown>; work: () => Promise<unknown> }): () => void {
  let stopped = false
  let timer: NodeJS.Timeout | undefined
  const tick = async () => {
    try {
      await o.ready()
      // A little slack, so a process whose timer runs a moment early still gets its turn.
      if (await takeTurn(db, o.task, o.intervalS * 0.9)) await o.work()
    } catch (err) {
      console.error(`[decalwright] ${o.task}:`, err instanceof Error ? err.message : err)
    }
    if (!stopped) timer = setTimeout(tick, o.intervalS * 1000).unref()
  }
  // Processes started together spread out their first turn.
  timer = setTimeout(tick, Math.random() * Math.min(o.intervalS, 60) * 1000).unref()
  return () => {
    stopped = true
    clearTimeout(timer)
  }
}
