// Sessions the server can end. The sealed cookie carries a random session id; the database
// keeps only its SHA-256, with the user, when it was last seen and whether it has ended, and
// every request checks it, so a copied cookie dies with sign-out, a password reset, a
// deactivation or a mentor's "sign out everywhere".
import { randomBytes } from 'node:crypto'
import type { Db } from '../platform/db'
import { hashToken } from '../platform/tokens'

export const SESSION_TTL_MS = 14 * 24 * 60 * 60 * 1000
/** last_seen_at is refreshed at most this often, so most requests only read. */
const TOUCH_MS = 5 * 60 * 1000

export type SessionEnd = 'sign-out' | 'password-reset' | 'deactivated' | 'signed-out-everywhere'

export async function openSession(db: Db, userId: number): Promise<string> {
  const id = randomBytes(32).toString('base64url')
  await db.insertInto('user_session').values({ id_hash: hashToken(id), user_id: userId, expires_at: new Date(Date.now() + SESSION_TTL_MS) }).execute()
  return id
}

/** The user of an open, unexpired session; undefined for an ended, expired or unknown one. */
export async function sessionUser(db: Db, sessionId: string): Promise<number | undefined> {
  const row = await db.selectFrom('user_session').select(['user_id', 'last_seen_at'])
    .where('id_hash', '=', hashToken(sessionId)).where('ended_at', 'is', null).where('expires_at', '>', new Date())
    .executeTakeFirst()
  if (!row) return undefined
  if (Date.now() - new Date(row.last_seen_at).getTime() > TOUCH_MS) {
    await db.updateTable('user_session').set({ last_seen_at: new Date() }).where('id_hash', '=', hashToken(sessionId)).execute()
  }
  return row.user_id
}

export async function endSession(db: Db, sessionId: string, why: SessionEnd): Promise<void> {
  await db.updateTable('user_session').set({ ended_at: new Date(), ended_why: why })
    .where('id_hash', '=', hashToken(sessionId)).where('ended_at', 'is', null).execute()
}

/** Ends every open session of a person; returns how many there were. */
export async function endUserSessions(db: Db, userId: number, why: SessionEnd): Promise<number> {
  const r = await db.updateTable('user_session').set({ ended_at: new Date(), ended_why: why })
    .where('user_id', '=', userId).where('ended_at', 'is', null).executeTakeFirst()
  return Number(r.numUpdatedRows)
}
