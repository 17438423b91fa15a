import type { H3Event } from 'h3'
import { sql } from 'kysely'

// Sign-in attempts are counted in PostgreSQL so the limit holds across several app processes.
export const SIGN_IN_WINDOW_MS = 15 * 60 * 1000
export const MAX_FAILURES_PER_EMAIL = 5
export const MAX_FAILURES_PER_IP = 50

const WRONG = 'Wrong e-mail or password.'

/** Seconds until another attempt is allowed, or 0 when it is allowed now. */
async function retryAfterSeconds(email: string, ip: string): Promise<number> {
  const db = useDb()
  const since = new Date(Date.now() - SIGN_IN_WINDOW_MS)
  const [byEmail, byIp] = await Promise.all([
    db.selectFrom('sign_in_attempt').select([sql<number>`count(*)::int`.as('n'), sql<Date>`min(at)`.as('first')])
      .where('email', '=', email).where('succeeded', '=', false).where('at', '>', since).executeTakeFirstOrThrow(),
    db.selectFrom('sign_in_attempt').select([sql<number>`count(*)::int`.as('n'), sql<Date>`min(at)`.as('first')])
      .where('ip', '=', ip).where('succeeded', '=', false).where('at', '>', since).executeTakeFirstOrThrow(),
  ])
  const waits: number[] = []
  for (const [row, max] of [[byEmail, MAX_FAILURES_PER_EMAIL], [byIp, MAX_FAILURES_PER_IP]] as const) {
    if (row.n >= max && row.first) waits.push(Math.ceil((new Date(row.first).getTime() + SIGN_IN_WINDOW_MS - Date.now()) / 1000))
  }
  return Math.max(0, ...waits)
}

export async function signIn(event: H3Event, email: string, password: string): Promise<{ home: string }> {
  const ip = getRequestIP(event, { xForwardedFor: true }) ?? 'unknown'
  const wait = await retryAfterSeconds(email, ip)
  if (wait > 0) {
    setResponseHeader(event, 'Retry-After', wait)
    throw createError({ statusCode: 429, message: `Too many attempts. Try again in ${Math.ceil(wait / 60)} minute${wait > 60 ? 's' : ''}.` })
  }
  const db = useDb()
  const user = await db.selectFrom('users').selectAll().where('email', '=', email).executeTakeFirst()
  // Verify against a real hash even for an unknown address, so timing does not tell which e-mails exist.
  const ok = user?.password_hash
    ? await verifyPassword(user.password_hash, password)
    : (await verifyPassword(await dummyHash(), password), false)
  const succeeded = ok && !!user?.active
  await db.transaction().execute(async (trx) => {
    await trx.insertInto('sign_in_attempt').values({ email, ip, succeeded }).execute()
    if (user) {
      await audit(trx, event, {
        programId: user.program_id, actorId: user.id, subjectType: 'user', subjectId: user.id,
        action: succeeded ? 'sign-in' : 'sign-in-failed',
        detail: succeeded ? {} : { reason: ok ? 'deactivated' : 'wrong password' },
      })
      if (succeeded) await trx.updateTable('users').set({ last_sign_in_at: new Date() }).where('id', '=', user.id).execute()
    }
  })
  if (!succeeded || !user) throw createError({ statusCode: 401, message: WRONG })
  await startSession(event, user.id)
  const actor = await loadActorFresh(event)
  return { home: homeFor(actor) }
}

export async function startSession(event: H3Event, userId: number): Promise<void> {
  await replaceUserSession(event, { user: { id: userId }, signedInAt: Date.now() })
  event.context.actor = undefined
}

/** Reads the actor for a session just set in this request. */
export async function loadActorFresh(event: H3Event) {
  event.context.actor = undefined
  const actor = await loadActor(event)
  if (!actor) throw createError({ statusCode: 401, message: 'Please sign in.' })
  return actor
}

let dummy: Promise<string> | undefined
function dummyHash(): Promise<string> {
  dummy ??= hashPassword('not-a-password-anyone-uses')
  return dummy
}
