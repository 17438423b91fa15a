// Signing in, the actor behind a session, and password resets.
import { createError } from 'h3'
import type { Me, ResetPreview } from '#shared/types/api'
import type { MemberRole } from '#shared/types/roles'
import { inTransaction, type Db } from '../platform/db'
import { absoluteUrl, queueMail } from '../platform/mail'
import { mailFakeInUse } from '../mail/outbox'
import { hashPassword, verifyPassword } from '../platform/passwords'
import { hashToken, newToken, RESET_TTL_MS } from '../platform/tokens'
import { actorRoles, programFlags, teamFlags, type Actor } from '../policy'
import { audit } from '../history/service'
import { resetMail } from '../mail/templates'
import { LINK_GONE, LINK_UNKNOWN } from '../people/invitations'
import { listTeams } from '../people/service'
import { homeFor } from './home'
import { endUserSessions } from './sessions'
import { actorRow, userByEmail } from './queries'
import { forgetCount, lowerCount, raiseCount } from './rate'

/** The active user with roles read fresh from the database; undefined for a deactivated or unknown one. */
export async function loadActor(db: Db, userId: number, ip: string | null): Promise<Actor | undefined> {
  const user = await actorRow(db, userId)
  if (!user?.active) return undefined
  return {
    id: user.id, name: user.name, email: user.email, programId: user.program_id,
    isMentor: user.mentor_id !== null,
    memberships: new Map<number, MemberRole>(user.memberships),
    ip,
  }
}

// Sign-in limits, counted in PostgreSQL so they hold across app processes, and keyed on what a
// guesser cannot change at will:
// - one source guessing one account: 5 wrong passwords in 15 minutes, then that pair waits;
// - one source guessing many accounts: 50 in 15 minutes, then that source waits;
// - one account guessed from many sources: slowed down, never locked, so a stranger cannot
//   lock its owner out, and the right password from a source that has not been guessing
//   always gets in.
export const SIGN_IN_WINDOW_MS = 15 * 60 * 1000
export const MAX_FAILURES_PER_PAIR = 5
export const MAX_FAILURES_PER_SOURCE = 50
const SLOW_AFTER_FAILURES = 5
const MAX_SLOWDOWN_MS = 4000

let dummy: Promise<string> | undefined
function dummyHash(): Promise<string> {
  dummy ??= hashPassword('not-a-password-anyone-uses')
  return dummy
}

export type SignInResult = { ok: true; userId: number } | { ok: false; retryAfterSeconds: number }

/** Checks a password; 401 for a wrong one. A source that guessed too often is told when to come back. */
export async function signIn(db: Db, input: { email: string; password: string; ip: string }): Promise<SignInResult> {
  const { email, password, ip } = input
  const keys = { source: `sign-in:source:${ip}`, pair: `sign-in:pair:${ip}:${email}`, account: `sign-in:account:${email}` }
  // Every attempt counts as a failure until the password proves right: counted first, checked
  // after, so parallel guesses cannot all pass under the limit.
  const pair = await raiseCount(db, keys.pair, SIGN_IN_WINDOW_MS)
  const source = await raiseCount(db, keys.source, SIGN_IN_WINDOW_MS)
  if (pair.count > MAX_FAILURES_PER_PAIR || source.count > MAX_FAILURES_PER_SOURCE) {
    return { ok: false, retryAfterSeconds: Math.max(pair.count > MAX_FAILURES_PER_PAIR ? pair.retryAfterSeconds : 0, source.count > MAX_FAILURES_PER_SOURCE ? source.retryAfterSeconds : 0) }
  }
  const account = await raiseCount(db, keys.account, SIGN_IN_WINDOW_MS)
  if (account.count > SLOW_AFTER_FAILURES) {
    await new Promise((r) => setTimeout(r, Math.min(MAX_SLOWDOWN_MS, 250 * 2 ** (account.count - SLOW_AFTER_FAILURES - 1))))
  }
  const user = await userByEmail(db, email)
  // Verify against a real hash even for an unknown address, so timing does not tell which e-mails exist.
  const ok = user?.password_hash
    ? await verifyPassword(user.password_hash, password)
    : (await verifyPassword(await dummyHash(), password), false)
  const succeeded = ok && !!user?.active
  await inTransaction(db, async (trx) => {
    await trx.insertInto('sign_in_attempt').values({ email, ip, succeeded }).execute()
    if (succeeded) {
      // Not a failure after all; and this source has shown it knows the password.
      await forgetCount(trx, keys.pair)
      await lowerCount(trx, keys.source)
      await lowerCount(trx, keys.account)
    }
    if (!user) return
    if (succeeded) {
      await audit(trx, { programId: user.program_id, actorId: user.id, ip, action: 'sign-in', subject: 'user', subjectId: user.id, detail: {} })
      await trx.updateTable('users').set({ last_sign_in_at: new Date() }).where('id', '=', user.id).execute()
    } else {
      await audit(trx, { programId: user.program_id, actorId: user.id, ip, action: 'sign-in-failed', subject: 'user', subjectId: user.id, detail: { reason: ok ? 'deactivated' : 'wrong password' } })
    }
  })
  if (!succeeded || !user) throw createError({ statusCode: 401, message: 'Wrong e-mail or password.' })
  return { ok: true, userId: user.id }
}

// ---------- password resets and first passwords ----------

/** At most this many reset mails an hour to one address, whoever asks. */
export const MAX_RESETS_PER_ADDRESS = 3
export const RESET_ADDRESS_WINDOW_MS = 60 * 60 * 1000
/** At most this many reset requests in 15 minutes from one source. */
export const MAX_RESET_REQUESTS_PER_SOURCE = 10
export const RESET_SOURCE_WINDOW_MS = 15 * 60 * 1000

/**
 * Writes a reset link for an active account into the outbox; the mail goes out after the
 * answer. The answer, and the work before it, are the same whether or not the address has an
 * account (and whether or not its hourly allowance is used up), so neither the answer nor its
 * timing tells which addresses exist. A source asking too often is refused.
 */
export async function requestReset(db: Db, email: string, ip: string): Promise<{ ok: true } | { ok: false; retryAfterSeconds: number }> {
  const source = await raiseCount(db, `reset:source:${ip}`, RESET_SOURCE_WINDOW_MS)
  if (source.count > MAX_RESET_REQUESTS_PER_SOURCE) return { ok: false, retryAfterSeconds: source.retryAfterSeconds }
  const address = await raiseCount(db, `reset:address:${email}`, RESET_ADDRESS_WINDOW_MS)
  const user = await db.selectFrom('users').select(['id', 'name', 'email', 'program_id', 'active']).where('email', '=', email).executeTakeFirst()
  if (!user || !user.active || address.count > MAX_RESETS_PER_ADDRESS) return { ok: true }
  const { token, hash } = newToken()
  await inTransaction(db, async (trx) => {
    await trx.insertInto('password_reset').values({ user_id: user.id, token_hash: hash, purpose: 'reset', expires_at: new Date(Date.now() + RESET_TTL_MS) }).execute()
    await audit(trx, { programId: user.program_id, actorId: user.id, ip, action: 'request-reset', subject: 'user', subjectId: user.id, detail: {} })
    await queueMail(trx, user.program_id, resetMail({ to: user.email, name: user.name, url: absoluteUrl(`/reset/${token}`) }))
  })
  return { ok: true }
}

async function findReset(db: Db, token: string, lock = false) {
  let q = db.selectFrom('password_reset').innerJoin('users', 'users.id', 'password_reset.user_id')
    .select(['password_reset.id', 'password_reset.user_id', 'password_reset.purpose', 'password_reset.expires_at', 'password_reset.used_at', 'users.email', 'users.active', 'users.program_id'])
    .where('password_reset.token_hash', '=', hashToken(token))
  if (lock) q = q.forUpdate()
  const row = await q.executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, message: LINK_UNKNOWN })
  if (row.used_at || new Date(row.expires_at).getTime() <= Date.now() || !row.active) throw createError({ statusCode: 410, message: LINK_GONE })
  return row
}

export async function previewReset(db: Db, token: string): Promise<ResetPreview> {
  const row = await findReset(db, token)
  return { email: row.email, purpose: row.purpose }
}

/** Sets the new password; returns the account's id so the route can start the session. */
export async function completeReset(db: Db, token: string, password: string, ip: string | null): Promise<number> {
  const passwordHash = await hashPassword(password)
  return inTransaction(db, async (trx) => {
    const row = await findReset(trx, token, true)
    await trx.updateTable('users').set({ password_hash: passwordHash }).where('id', '=', row.user_id).execute()
    // Every other outstanding link and every session of this account die with this one.
    await endUserSessions(trx, row.user_id, 'password-reset')
    await trx.updateTable('password_reset').set({ used_at: new Date() }).where('user_id', '=', row.user_id).where('used_at', 'is', null).execute()
    await audit(trx, { programId: row.program_id, actorId: row.user_id, ip, action: row.purpose === 'welcome' ? 'set-first-password' : 'reset-password', subject: 'user', subjectId: row.user_id, detail: {} })
    return row.user_id
  })
}

// ---------- who am I ----------

/** The signed-in person, their program, their teams and what they may do, for every page. */
export async function describeMe(db: Db, actor: Actor): Promise<Me> {
  const row = await db.selectFrom('program').select(['id', 'name', 'school', 'laser_work_width_mm', 'laser_work_height_mm']).where('id', '=', actor.programId).executeTakeFirstOrThrow()
  const teams = await listTeams(db, actor)
  return {
    user: { id: actor.id, name: actor.name, email: actor.email },
    program: {
      id: row.id, name: row.name, school: row.school,
      laserWorkArea: row.laser_work_width_mm && row.laser_work_height_mm ? { widthMm: row.laser_work_width_mm, heightMm: row.laser_work_height_mm } : null,
    },
    isMentor: actor.isMentor,
    roles: actorRoles(actor),
    teams: teams.filter((t) => t.myRole).map((t) => ({
      id: t.id, name: t.name, number: t.number, colour: t.colour, role: t.myRole!,
      can: teamFlags(actor, { teamId: t.id, programId: actor.programId }),
    })),
    home: homeFor(actor),
    mailFake: mailFakeInUse(),
    can: programFlags(actor),
  }
}
