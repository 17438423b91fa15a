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

/** Only same-site paths are followed after sign-in, so a crafted link cannot send people elsewhere. */
export function safeNext(next: unknown): string | null {
  const value = Array.isArray(next) ? next[0] : next
  if (typeof value !== 'string') return null
  if (!value.startsWith('/') || value.startsWith('//') || value.startsWith('/\\')) return null
  if (value.startsWith('/sign-in')) return null
  return value
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
