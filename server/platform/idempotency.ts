// Requests sent with an Idempotency-Key: the first one with a given key, from a given person to
// a given route, is done; any later one within the window gets the first one's answer, or 409
// while the first is still being done. Keys belong to a person: the same key from someone else
// is a different request. The route helper is server/utils/idempotency.ts.
import { randomUUID } from 'node:crypto'
import { sql, type ExpressionBuilder } from 'kysely'
import type { Database } from '../db/schema'
import type { Db } from './db'

/** How long an answer is kept for a repeat of its request. */
export const IDEMPOTENCY_WINDOW_HOURS = 24
/** A request still unfinished after this long died with its process: its key may be used again. */
const ABANDONED_AFTER_MINUTES = 10

export interface RequestKey { userId: number; route: string; key: string; fingerprint: string }

export type Begun =
  | { kind: 'run'; attempt: string }
  | { kind: 'replay'; answer: unknown }
  | { kind: 'running' }
  | { kind: 'other-request' }

/** Claims the key for this request, or says what became of the request that claimed it first. */
export async function beginRequest(db: Db, r: RequestKey): Promise<Begun> {
  // Twice at most: a failed first request may remove its claim between our two statements.
  for (let round = 0; round < 2; round++) {
    const attempt = randomUUID()
    const claimed = await db.insertInto('idempotent_request')
      .values({ user_id: r.userId, route: r.route, key: r.key, fingerprint: r.fingerprint, attempt })
      .onConflict((oc) => oc.columns(['user_id', 'route', 'key'])
        .doUpdateSet({ fingerprint: r.fingerprint, attempt, started_at: sql<Date>`now()`, finished_at: null, answer: null })
        .where((eb) => eb.or([
          eb('idempotent_request.started_at', '<', sql<Date>`now() - make_interval(hours => ${IDEMPOTENCY_WINDOW_HOURS})`),
          eb.and([
            eb('idempotent_request.finished_at', 'is', null),
            eb('idempotent_request.started_at', '<', sql<Date>`now() - make_interval(mins => ${ABANDONED_AFTER_MINUTES})`),
          ]),
        ])))
      .returning('attempt').executeTakeFirst()
    if (claimed) return { kind: 'run', attempt }
    const first = await db.selectFrom('idempotent_request').select(['fingerprint', 'finished_at', 'answer'])
      .where('user_id', '=', r.userId).where('route', '=', r.route).where('key', '=', r.key).executeTakeFirst()
    if (!first) continue
    if (first.fingerprint !== r.fingerprint) return { kind: 'other-request' }
    return first.finished_at ? { kind: 'replay', answer: first.answer } : { kind: 'running' }
  }
  return { kind: 'running' }
}

function ofAttempt(r: RequestKey, attempt: string) {
  return (eb: ExpressionBuilder<Database, 'idempotent_request'>) => eb.and({ user_id: r.userId, route: r.route, key: r.key, attempt })
}

/** Keeps the answer for repeats. */
export async function finishRequest(db: Db, r: RequestKey, attempt: string, answer: unknown): Promise<void> {
  await db.updateTable('idempotent_request').set({ finished_at: new Date(), answer: JSON.stringify(answer ?? null) })
    .where(ofAttempt(r, attempt)).execute()
}

/** The request failed and changed nothing: the key is free for another try. */
export async function dropRequest(db: Db, r: RequestKey, attempt: string): Promise<void> {
  await db.deleteFrom('idempotent_request').where(ofAttempt(r, attempt)).execute()
}

/** Answers older than the window are no use to anyone. */
export async function forgetOldRequests(db: Db): Promise<number> {
  const r = await db.deleteFrom('idempotent_request')
    .where('started_at', '<', sql<Date>`now() - make_interval(hours => ${IDEMPOTENCY_WINDOW_HOURS})`).executeTakeFirst()
  return Number(r.numDeletedRows)
}
