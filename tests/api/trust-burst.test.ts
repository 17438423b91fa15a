// A careless classroom: bursts of the same request, and double submits from a form.
import { beforeAll, describe, expect, it } from 'vitest'
import { ApiClient } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS } from '../support/demo'
import { approvedOnRobot } from '../support/scenario'
import { mailTo } from '../support/mail'

let setup: Awaited<ReturnType<typeof approvedOnRobot>>
let placementId: number

beforeAll(async () => {
  setup = await approvedOnRobot('Burst')
  const r = await setup.mentor.post('/api/placements', {
    robotId: setup.robotId, revisionId: setup.revisionId, filmId: setup.film.id, spot: 'front plate', widthMm: 40, quantity: 1, spares: 0,
  })
  expect(r.status, JSON.stringify(r.body)).toBe(201)
  placementId = r.body.id
})

describe('a burst of reprints', () => {
  it('never hangs the app: 50 at once all get an answer, and the health check answers within 5 s after', async () => {
    const replies = await Promise.all(Array.from({ length: 50 }, (_, i) =>
      setup.student.request('POST', `/api/placements/${placementId}/reprints`, { quantity: 1, reason: `burst ${i}` }, { 'idempotency-key': `burst-${Date.now()}-${i}` })))
    for (const r of replies) expect([201, 503], JSON.stringify(r.body)).toContain(r.status)
    expect(replies.filter((r) => r.status === 201).length).toBeGreaterThan(0)
    const t0 = Date.now()
    const health = await fetch(new URL('/api/health', setup.student.baseUrl), { signal: AbortSignal.timeout(5000) })
    expect(health.status).toBe(200)
    expect(Date.now() - t0).toBeLessThan(5000)
  })
})

describe('double submits', () => {
  it('five identical placements sent at once with one idempotency key make one placement, one job and one mail', async () => {
    const spot = `rear panel ${Date.now()}`
    const body = { robotId: setup.robotId, revisionId: setup.revisionId, filmId: setup.film.id, spot, widthMm: 30, quantity: 2, spares: 1 }
    const key = `placement-${Date.now()}`
    const replies = await Promise.all(Array.from({ length: 5 }, () => setup.mentor.request('POST', '/api/placements', body, { 'idempotency-key': key })))
    const ids = new Set(replies.filter((r) => r.status === 201 || r.status === 200).map((r) => r.body.id))
    expect(ids.size).toBe(1)
    for (const r of replies) expect([200, 201, 409], JSON.stringify(r.body)).toContain(r.status)
    const rows = await testDb().selectFrom('placement').select('id').where('robot_id', '=', setup.robotId).where('spot', '=', spot).execute()
    expect(rows).toHaveLength(1)
    const jobs = await testDb().selectFrom('job').select('id').where('placement_id', '=', rows[0]!.id).execute()
    expect(jobs).toHaveLength(1)
    // The burst above left a queue of mail to work through: wait for this job's, then a moment
    // more for any second one.
    const forJob = async () => (await mailTo(DEMO_ACCOUNTS.operator.email)).filter((m) => (m.text ?? '').includes(`/lab/jobs/${jobs[0]!.id}`))
    const deadline = Date.now() + 30_000
    while (!(await forJob()).length && Date.now() < deadline) await new Promise((r) => setTimeout(r, 250))
    await new Promise((r) => setTimeout(r, 1500))
    expect(await forJob()).toHaveLength(1)
  })

  it('the same key from another person is theirs alone', async () => {
    const key = `shared-key-${Date.now()}`
    const a = await setup.student.request('POST', `/api/placements/${placementId}/reprints`, { quantity: 1, reason: 'first person' }, { 'idempotency-key': key })
    const designer = new ApiClient()
    await designer.signIn(DEMO_ACCOUNTS.designer.email, 'workshop-demo-2026')
    const b = await designer.request('POST', `/api/placements/${placementId}/reprints`, { quantity: 1, reason: 'second person' }, { 'idempotency-key': key })
    expect(a.status).toBe(201)
    expect(b.status).toBe(201)
    expect(b.body.jobId).not.toBe(a.body.jobId)
  })
})
