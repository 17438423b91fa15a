// The route helper for requests that create something: with an Idempotency-Key header, a second
// send of the same form (a double click, a retry after a lost answer) gets the first answer
// instead of doing the work twice. Rules in server/platform/idempotency.ts.
import { createError, getRequestHeader, setResponseHeader, type H3Event } from 'h3'
import { useDb } from '../platform/db'
import { beginRequest, dropRequest, finishRequest, type RequestKey } from '../platform/idempotency'
import type { Actor } from '../policy'

const KEY = /^[\x21-\x7e]{1,200}$/

/** Runs `work` once per (person, route, Idempotency-Key); without the header, every time. Call after the body is read. */
export async function idempotent<T>(event: H3Event, actor: Actor, work: () => Promise<T>): Promise<T> {
  const key = getRequestHeader(event, 'idempotency-key')
  if (key === undefined) return work()
  if (!KEY.test(key)) throw createError({ statusCode: 400, message: 'The Idempotency-Key header must be 1 to 200 visible characters.' })
  const request: RequestKey = {
    userId: actor.id, route: `${event.method} ${event.path.split('?')[0]}`, key,
    // Set by readJson and readUpload: the same key may not be reused for other content.
    fingerprint: event.context.bodyFingerprint ?? '',
  }
  const db = useDb()
  const begun = await beginRequest(db, request)
  if (begun.kind === 'replay') {
    setResponseHeader(event, 'idempotency-replayed', 'true')
    return begun.answer as T
  }
  if (begun.kind === 'running') {
    throw createError({ statusCode: 409, message: 'This was sent a moment ago and is still being done. Wait a moment and reload before sending it again.' })
  }
  if (begun.kind === 'other-request') {
    throw createError({ statusCode: 422, message: 'This Idempotency-Key was already used for a different request.' })
  }
  let answer: T
  try {
    answer = await work()
  } catch (err) {
    // Nothing was done (the work is one transaction): the key is free again.
    await dropRequest(db, request, begun.attempt).catch(() => {})
    throw err
  }
  // The work is done; if its answer cannot be kept, the key stays taken until it counts as abandoned.
  await finishRequest(db, request, begun.attempt, answer)
    .catch((err) => console.error('[decalwright] could not keep an answer for its Idempotency-Key:', err instanceof Error ? err.message : err))
  return answer
}

declare module 'h3' {
  interface H3EventContext {
    /** SHA-256 of the request's content, set when the body is read. */
    bodyFingerprint?: string
  }
}
