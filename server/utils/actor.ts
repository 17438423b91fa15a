// The guard glue between a request and the policy (server/policy): who is asking, and
// whether they may. Auto-imported into routes.
import { createError, type H3Event } from 'h3'
import type { ProgramAction, TeamAction } from '#shared/types/policy'
import { useDb } from '../platform/db'
import { clientAddress } from '../platform/client-address'
import { can, REFUSALS, type Actor, type TeamSubject } from '../policy'
import { loadActor } from '../auth/service'
import { homeFor } from '../auth/home'
import { endSession, openSession, sessionUser } from '../auth/sessions'

/** The address the request came from, as the history and the rate limits record it. */
export function requestIp(event: H3Event): string {
  return clientAddress(event)
}

/** The signed-in, active user with roles read fresh from the database; undefined when signed out. */
export async function currentActor(event: H3Event): Promise<Actor | undefined> {
  if (event.context.actor !== undefined) return event.context.actor ?? undefined
  const session = await getUserSession(event)
  const userId = session.user?.id
  const sid = session.secure?.sid
  let actor: Actor | undefined
  if (typeof userId === 'number') {
    const db = useDb()
    // The session must still be open: sign-out, a reset or "sign out everywhere" ended it otherwise.
    if (sid && (await sessionUser(db, sid)) === userId) actor = await loadActor(db, userId, requestIp(event))
    // Ended, deactivated or deleted: the cookie is worthless from now on.
    if (!actor) await clearUserSession(event)
  }
  event.context.actor = actor ?? null
  return actor
}

/** 401 when signed out. */
export async function requireActor(event: H3Event): Promise<Actor> {
  const actor = await currentActor(event)
  if (!actor) throw createError({ statusCode: 401, message: 'Please sign in.' })
  return actor
}

/** For program work: 401 signed out, 403 for a role that may not do it, before anything is looked up. */
export async function requireCan(event: H3Event, action: ProgramAction): Promise<Actor> {
  const actor = await requireActor(event)
  if (!can(actor, action)) throw createError({ statusCode: 403, message: REFUSALS[action] })
  return actor
}

/**
 * For work on one team's thing, found through a scoped query: 404 when it was not found
 * (another team's or program's things do not exist for the actor), 403 when the actor's
 * role in its team may not do `action`. Returns the thing.
 */
export function authorize<S extends TeamSubject>(actor: Actor, action: TeamAction, subject: S | undefined, notFound: string): S {
  if (!subject) throw createError({ statusCode: 404, message: notFound })
  if (!can(actor, action, subject)) throw createError({ statusCode: 403, message: REFUSALS[action] })
  return subject
}

/** Ends this request's session: the row first, so a copy of the cookie is worthless too. */
export async function endCurrentSession(event: H3Event): Promise<void> {
  const session = await getUserSession(event)
  if (session.secure?.sid) await endSession(useDb(), session.secure.sid, 'sign-out')
  await clearUserSession(event)
  event.context.actor = null
}

/** Starts a session for a user who just proved who they are, and says where they start. */
export async function startSession(event: H3Event, userId: number): Promise<{ home: string }> {
  const sid = await openSession(useDb(), userId)
  await replaceUserSession(event, { user: { id: userId }, secure: { sid }, signedInAt: Date.now() })
  event.context.actor = undefined
  const actor = await requireActor(event)
  return { home: homeFor(actor) }
}

declare module 'h3' {
  interface H3EventContext {
    actor?: Actor | null
  }
}
