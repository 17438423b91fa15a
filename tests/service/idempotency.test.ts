import { sql } from 'kysely'
import { describe, expect } from 'vitest'
import { beginRequest, dropRequest, finishRequest, forgetOldRequests, type RequestKey } from '../../server/platform/idempotency'
import { buildProgram } from '../support/fixtures'
import { test } from '../support/service'

describe('requests sent with an Idempotency-Key', () => {
  test('the first is done; repeats get its answer, or 409 while it runs; keys are per person and route', async ({ trx }) => {
    const p = await buildProgram(trx)
    const r: RequestKey = { userId: p.mentor, route: 'POST /api/placements', key: 'k-1', fingerprint: 'f-1' }
    const first = await beginRequest(trx, r)
    expect(first.kind).toBe('run')
    expect(await beginRequest(trx, r)).toEqual({ kind: 'running' })
    await finishRequest(trx, r, (first as { attempt: string }).attempt, { id: 7, spot: 'front' })
    expect(await beginRequest(trx, r)).toEqual({ kind: 'replay', answer: { id: 7, spot: 'front' } })
    // The same key for other content is refused, not answered with the first one's result.
    expect(await beginRequest(trx, { ...r, fingerprint: 'f-2' })).toEqual({ kind: 'other-request' })
    // Another person, or another route, with the same key is another request.
    expect((await beginRequest(trx, { ...r, userId: p.teams[0].student })).kind).toBe('run')
    expect((await beginRequest(trx, { ...r, route: 'POST /api/placements/3/reprints' })).kind).toBe('run')
  })

  test('a request that failed frees its key; an answer older than a day, or a request abandoned for ten minutes, is not kept', async ({ trx }) => {
    const p = await buildProgram(trx)
    const r: RequestKey = { userId: p.mentor, route: 'POST /api/teams', key: 'k-2', fingerprint: 'f' }
    const first = await beginRequest(trx, r) as { kind: 'run'; attempt: string }
    await dropRequest(trx, r, first.attempt)
    const second = await beginRequest(trx, r) as { kind: 'run'; attempt: string }
    expect(second.kind).toBe('run')
    // A late drop of the first attempt leaves the second one's claim alone.
    await dropRequest(trx, r, first.attempt)
    expect(await beginRequest(trx, r)).toEqual({ kind: 'running' })

    const age = (interval: string) => sql`update idempotent_request set started_at = now() - ${interval}::interval where key = ${r.key}`.execute(trx)
    await age('11 minutes')
    const taken = await beginRequest(trx, r) as { kind: 'run'; attempt: string }
    expect(taken.kind).toBe('run')
    await finishRequest(trx, r, taken.attempt, { ok: true })
    await age('11 minutes')
    expect((await beginRequest(trx, r)).kind).toBe('replay')
    await age('25 hours')
    expect(await forgetOldRequests(trx)).toBeGreaterThanOrEqual(1)
    expect((await beginRequest(trx, r)).kind).toBe('run')
  })
})
