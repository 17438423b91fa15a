// An outside service that did not answer in time (or could not be reached, or had no free
// connection) is a fault of that service, not of the request. The database and object-store
// modules turn such failures into ServiceUnavailable where they happen. It carries its HTTP
// answer, 503 with a sentence naming the service, which h3 takes over when a route lets it
// through (never a 500 with a stack); server/error-handler.ts logs the cause and adds
// Retry-After. Free of Nuxt: the scripts and tests use the database module too.

export type OutsideService = 'database' | 'file store'

const SENTENCES: Record<OutsideService, string> = {
  'database': 'The database did not answer in time. Try again in a moment.',
  'file store': 'The file store did not answer in time. Try again in a moment.',
}

export class ServiceUnavailable extends Error {
  // Read by h3 when it turns a thrown error into an answer.
  readonly statusCode = 503
  readonly statusMessage = 'Service Unavailable'
  readonly unhandled = false
  /** What the service's client said (not `cause`: h3 would keep that and drop this error). */
  readonly reason: string

  constructor(readonly service: OutsideService, failure: unknown) {
    super(SENTENCES[service])
    this.name = 'ServiceUnavailable'
    this.reason = failure instanceof Error ? failure.message : String(failure)
  }
}

/** The ServiceUnavailable in an error or its chain of causes (h3 wraps what a route throws). */
export function serviceFault(err: unknown): ServiceUnavailable | undefined {
  for (let e = err, depth = 0; e && depth < 5; e = (e as { cause?: unknown }).cause, depth++) {
    if (e instanceof ServiceUnavailable) return e
  }
  return undefined
}

// PostgreSQL's own codes for "not now": query cancelled (statement_timeout), idle-in-transaction
// timeout, the server shutting down or not yet accepting, too many connections, and the whole
// connection-exception class 08 (PostgreSQL manual, Appendix A, "PostgreSQL Error Codes").
const PG_UNAVAILABLE = /^(57014|25P03|57P0[1-4]|53300|08...)$/
// What node-postgres itself says when a connection cannot be had or stops answering.
const PG_CLIENT_MESSAGES = /^(timeout exceeded when trying to connect|Query read timeout|Connection terminated)/
const NETWORK_CODES = new Set(['ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'EHOSTUNREACH', 'ENETUNREACH', 'EAI_AGAIN', 'ENOTFOUND'])

function codeOf(err: unknown): string {
  return String((err as { code?: unknown } | null)?.code ?? '')
}

/** A database error that means the database is unavailable, as ServiceUnavailable; any other error as it is. */
export function databaseFault(err: unknown): unknown {
  if (err instanceof ServiceUnavailable) return err
  const code = codeOf(err)
  const message = err instanceof Error ? err.message : ''
  if (PG_UNAVAILABLE.test(code) || NETWORK_CODES.has(code) || PG_CLIENT_MESSAGES.test(message)) return new ServiceUnavailable('database', err)
  return err
}

/** An object-store error that means the store is unavailable (a timeout, no connection, a 5xx), as ServiceUnavailable. */
export function fileStoreFault(err: unknown): unknown {
  if (err instanceof ServiceUnavailable) return err
  const e = err as { name?: string; $metadata?: { httpStatusCode?: number } } | null
  const status = e?.$metadata?.httpStatusCode ?? 0
  if (e?.name === 'TimeoutError' || e?.name === 'AbortError' || NETWORK_CODES.has(codeOf(err)) || status >= 500) {
    return new ServiceUnavailable('file store', err)
  }
  return err
}
