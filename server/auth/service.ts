// Signing in, the actor behind a session, and password resets.
import { createError } from 'h3'
import type { Me, ResetPreview } from '#shared/types/api'
import type { MemberRole } from '#shared/types/roles'
import { inTransaction, type Db } from '../platform/db'
import { absoluteUrl, sendMail } from '../platform/mail'
import { outboxDir } from '../platform/mail-outbox'
import { hashPassword, verifyPassword } from '../platform/passwords'
import { hashToken, newToken, RESET_TTL_MS } from '../platform/tokens'
import { actorRoles, programFlags, teamFlags, type Actor } from '../policy'
import { audit } from '../history/service'
import { resetMail } from '../mail/templates'
import { LINK_GONE, LINK_UNKNOWN } from '../people/invitations'
import { listTeams } from '../people/service'
import { homeFor } from './home'
import { actorRow, failuresSince, userByEmail } from './queries'

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

// Sign-in attempts are counted in PostgreSQL so the limit holds across several app processes.
export const SIGN_IN_WINDOW_MS = 15 * 60 * 1000
export const MAX_FAILURES_PER_EMAIL = 5
export const MAX_FAILURES_PER_IP = 50

/** Seconds until another attempt is allowed, or 0 when it is allowed now. */
async function retryAfterSeconds(db: Db, email: string, ip: string): Promise<number> {
  const since = new Date(Date.now() - SIGN_IN_WINDOW_MS)
  const byEmail = await failuresSince(db, { email }, since)
  const byIp = await failuresSince(db, { ip }, since)
  const waits: number[] = []
  for (const [row, max] of [[byEmail, MAX_FAILURES_PER_EMAIL], [byIp, MAX_FAILURES_PER_IP]] as const) {
    if (row.n >= max && row.first) waits.push(Math.ceil((new Date(row.first).getTime() + SIGN_IN_WINDOW_MS - Date.now()) / 1000))
  }
  return Math.max(0, ...waits)
}

let dummy: Promise<string> | undefined
function dummyHash(): Promise<string> {
  dummy ??= hashPassword('not-a-password-anyone-uses')
  return dummy
}

export type SignInResult = { ok: true; userId: number } | { ok: false; retryAfterSeconds: number }

/** Checks a password; 401 for a wrong one. A source that tried too often is told when to come back. */
export async function signIn(db: Db, input: { email: string; password: string; ip: string }): Promise<SignInResult> {
  const { email, password, ip } = input
  const wait = await retryAfterSeconds(db, email, ip)
  if (wait > 0) return { ok: false, retryAfterSeconds: wait }
  const user = await userByEmail(db, email)
  // Verify against a real hash even for an unknown address, so timing does not tell which e-mails exist.
  const ok = user?.password_hash
    ? await verifyPassword(user.password_hash, password)
    : (await verifyPassword(await dummyHash(), password), false)
  const succeeded = ok && !!user?.active
  await inTransaction(db, async (trx) => {
    await trx.insertInto('sign_in_attempt').values({ email, ip, succeeded }).execute()
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

/** Mails a reset link to an active account; the answer is the same whether or not one exists. */
export async function requestReset(db: Db, email: string, ip: string | null): Promise<void> {
  const user = await db.selectFrom('users').select(['id', 'name', 'email', 'program_id', 'active']).where('email', '=', email).executeTakeFirst()
  if (!user || !user.active) return
  const { token, hash } = newToken()
  await inTransaction(db, async (trx) => {
    await trx.insertInto('password_reset').values({ user_id: user.id, token_hash: hash, purpose: 'reset', expires_at: new Date(Date.now() + RESET_TTL_MS) }).execute()
    await audit(trx, { programId: user.program_id, actorId: user.id, ip, action: 'request-reset', subject: 'user', subjectId: user.id, detail: {} })
    await sendMail(resetMail({ to: user.email, name: user.name, url: absoluteUrl(`/reset/${token}`) }))
  })
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
    // Every other outstanding link for this account dies with this one.
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
    mailFake: !!outboxDir(),
    can: programFlags(actor),
  }
}
