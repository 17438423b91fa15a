import type { ApiErrorBody } from '#shared/types/api'

/** What a failed API call means for a screen: a status, a sentence, and per-field messages. */
export interface ApiProblem {
  /** HTTP status; 0 when no answer came back at all. */
  status: number
  message: string
  fieldErrors: Record<string, string>
  /** What kind of refusal, when the server names one (e.g. 'not-a-drawing'). */
  kind: string | null
}

const FALLBACK: Record<number, string> = {
  0: 'Could not reach Decalwright. Check the connection and try again.',
  400: 'Some of the details need another look.',
  401: 'Your session has ended. Sign in again.',
  403: 'Your role does not allow this.',
  404: 'That could not be found. It may have been removed.',
  409: 'That clashes with something that already exists.',
  410: 'That link has expired or was already used.',
  429: 'Too many attempts. Wait a little and try again.',
}

/**
 * Reads the h3 error JSON out of whatever $fetch or useFetch threw, so every form
 * shows server answers the same way.
 */
export function apiProblem(err: unknown): ApiProblem {
  const e = (err ?? {}) as {
    statusCode?: number
    status?: number
    response?: { status?: number }
    data?: Partial<ApiErrorBody> & { fieldErrors?: Record<string, string[]>; data?: { kind?: unknown } }
  }
  const body = e.data && typeof e.data === 'object' ? e.data : undefined
  const status = Number(e.statusCode ?? e.status ?? e.response?.status ?? body?.statusCode ?? 0) || 0
  const raw = body?.data?.fieldErrors ?? body?.fieldErrors ?? {}
  const fieldErrors: Record<string, string> = {}
  for (const [field, messages] of Object.entries(raw)) {
    if (Array.isArray(messages) && messages[0]) fieldErrors[field] = String(messages[0])
  }
  // Server-side faults keep their internals to themselves.
  const serverMessage = status >= 500 ? '' : (body?.message ?? '').trim()
  const message = serverMessage
    || FALLBACK[status]
    || (status >= 500 ? 'Something went wrong on our side. Try again in a moment.' : 'That did not work. Try again.')
  const kind = typeof body?.data?.kind === 'string' ? body.data.kind : null
  return { status, message, fieldErrors, kind }
}

export function statusOf(err: unknown): number {
  return apiProblem(err).status
}

/**
 * Only same-site paths are followed after sign-in, so a crafted link cannot send people elsewhere.
 * Control characters and backslashes are refused anywhere: URL parsers drop tabs and newlines
 * and read a backslash as "/" (WHATWG URL Standard, basic URL parser), so "/\t/evil.example" would
 * become "//evil.example", another site; and such a path cannot go in a Location header.
 */
export function safeNext(next: unknown): string | null {
  const value = Array.isArray(next) ? next[0] : next
  if (typeof value !== 'string') return null
  // eslint-disable-next-line no-control-regex
  if (/[\u0000-\u001f\u007f\\]/.test(value)) return null
  if (!value.startsWith('/') || value.startsWith('//')) return null
  if (value.startsWith('/sign-in')) return null
  return value
}

/** Sent with every request that creates something, so a form sent twice is done once. */
export const IDEMPOTENCY_HEADER = 'Idempotency-Key'

/**
 * A fresh random key (128 bits, hex). getRandomValues works on plain http too, where
 * crypto.randomUUID is missing (a school server reached by its address on the local network).
 */
export function newIdempotencyKey(): string {
  const bytes = crypto.getRandomValues(new Uint8Array(16))
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('')
}

/**
 * The Idempotency-Key of one submission at a time. It lives until a definite answer, so a second
 * click or a retry after an answer that never came is the same submission and the server does
 * the work once; after a success or a refusal of what was sent, the next submission gets a
 * fresh key. Without an answer, or while the first is still being done (409), the key stays.
 */
export function submissionKey() {
  let key: string | null = null
  return {
    headers: (): Record<string, string> => ({ [IDEMPOTENCY_HEADER]: (key ??= newIdempotencyKey()) }),
    settled(err?: unknown) {
      const status = err === undefined ? 200 : statusOf(err)
      if (status < 500 && status !== 0 && status !== 409) key = null
    },
  }
}

/** Pages anyone may open without signing in. */
export function isPublicPath(path: string): boolean {
  return path === '/sign-in'
    || path.startsWith('/invitations/')
    || path === '/reset' || path.startsWith('/reset/')
}

/** The client-side check for "type it again": null when the two match. */
export function confirmProblem(password: string, confirm: string): string | null {
  if (!confirm) return 'Type the password a second time.'
  return password === confirm ? null : 'The two passwords do not match.'
}
