import { describe, expect, it } from 'vitest'
import { databaseFault, fileStoreFault, serviceFault, ServiceUnavailable } from '../../../server/platform/faults'

const pgError = (code: string, message = 'x') => Object.assign(new Error(message), { code })

describe('an outside service that does not answer', () => {
  it('is a database fault for node-postgres timeouts, lost connections and PostgreSQL\'s "not now" codes', () => {
    // Codes from the PostgreSQL manual, Appendix A: 57014 query_canceled (statement_timeout),
    // 25P03 idle_in_transaction_session_timeout, 57P01 admin_shutdown, 53300 too_many_connections,
    // 08006 connection_failure.
    for (const err of [
      new Error('timeout exceeded when trying to connect'), new Error('Query read timeout'),
      new Error('Connection terminated due to connection timeout'), new Error('Connection terminated unexpectedly'),
      pgError('57014'), pgError('25P03'), pgError('57P01'), pgError('53300'), pgError('08006'), pgError('ECONNREFUSED'),
    ]) {
      const fault = databaseFault(err)
      expect(fault, err.message + (err as { code?: string }).code).toBeInstanceOf(ServiceUnavailable)
      expect((fault as ServiceUnavailable).message).toMatch(/^The database did not answer in time/)
    }
  })

  it('leaves every other database error as it is (a unique key, a check, a syntax error)', () => {
    for (const err of [pgError('23505'), pgError('23514'), pgError('42601'), new Error('something else')]) expect(databaseFault(err)).toBe(err)
  })

  it('is a file-store fault for timeouts, refused connections and 5xx answers, not for a missing file', () => {
    const timeout = Object.assign(new Error('socket timed out'), { name: 'TimeoutError' })
    const slowDown = Object.assign(new Error('SlowDown'), { $metadata: { httpStatusCode: 503 } })
    for (const err of [timeout, slowDown, pgError('ECONNRESET')]) {
      expect((fileStoreFault(err) as ServiceUnavailable).message).toMatch(/^The file store did not answer in time/)
    }
    const missing = Object.assign(new Error('NotFound'), { $metadata: { httpStatusCode: 404 } })
    expect(fileStoreFault(missing)).toBe(missing)
  })

  it('answers 503, and is found however deep a wrapper put it', () => {
    const fault = new ServiceUnavailable('file store', new Error('socket timed out'))
    expect({ statusCode: fault.statusCode, unhandled: fault.unhandled, reason: fault.reason }).toEqual({ statusCode: 503, unhandled: false, reason: 'socket timed out' })
    expect(serviceFault(new Error('outer', { cause: new Error('middle', { cause: fault }) }))).toBe(fault)
    expect(serviceFault(new Error('nothing of the kind'))).toBeUndefined()
  })
})
