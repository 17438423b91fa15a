import { describe, expect, it } from 'vitest'
import { ApiClient, signedIn, uniqueEmail } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { makeUser } from '../support/people'

describe('sign-in', () => {
  it('answers 401 to /api/me when signed out', async () => {
    const r = await new ApiClient().get('/api/me')
    expect(r.status).toBe(401)
  })

  it.each([
    ['mentor', '/program', ['mentor']],
    ['designer', '/studio', ['designer']],
    ['student', '/studio', ['student']],
    ['operator', '/lab', ['operator']],
  ] as const)('signs in the demo %s and sends them to %s', async (role, home, roles) => {
    const c = new ApiClient()
    const r = await c.signIn(DEMO_ACCOUNTS[role].email, DEMO_PASSWORD)
    expect(r.body).toEqual({ home })
    const me = await c.get('/api/me')
    expect(me.status).toBe(200)
    expect(me.body.user.email).toBe(DEMO_ACCOUNTS[role].email)
    expect(me.body.program.name).toBe('Harbourline Robotics')
    expect(me.body.roles).toEqual(roles)
    expect(me.body.home).toBe(home)
    expect(me.body.mailFake).toBe(true)
    if (role === 'mentor') {
      expect(me.body.teams.map((t: any) => t.name)).toEqual(expect.arrayContaining(['Copper Wrens', 'Tidewater Sprockets']))
      expect(new Set(me.body.teams.map((t: any) => t.role))).toEqual(new Set(['mentor']))
    }
    else expect(me.body.teams).toEqual([expect.objectContaining({ name: 'Copper Wrens', role })])
  })

  it('gives one vague answer for a wrong password and for an unknown address', async () => {
    const wrong = await new ApiClient().post('/api/auth/sign-in', { email: DEMO_ACCOUNTS.designer.email, password: 'not-the-password' })
    const unknown = await new ApiClient().post('/api/auth/sign-in', { email: uniqueEmail('nobody'), password: 'whatever-it-is' })
    expect(wrong.status).toBe(401)
    expect(unknown.status).toBe(401)
    expect(wrong.body.message).toBe(unknown.body.message)
    expect(wrong.body.message).toBe('Wrong e-mail or password.')
  })

  it('treats the e-mail address without regard to case or spaces', async () => {
    const c = new ApiClient()
    const r = await c.post('/api/auth/sign-in', { email: `  ${DEMO_ACCOUNTS.student.email.toUpperCase()} `, password: DEMO_PASSWORD })
    expect(r.status).toBe(200)
  })

  it('refuses malformed JSON with 400, missing fields with field errors, a huge body with 413', async () => {
    const c = new ApiClient()
    const malformed = await c.post('/api/auth/sign-in', '{"email": ')
    expect(malformed.status).toBe(400)
    expect(malformed.body.message).toMatch(/not valid JSON/)
    const missing = await c.post('/api/auth/sign-in', { email: '' })
    expect(missing.status).toBe(400)
    expect(missing.body.data.fieldErrors.email).toEqual(['Enter your e-mail address.'])
    expect(missing.body.data.fieldErrors.password).toBeDefined()
    const huge = await c.post('/api/auth/sign-in', { email: 'a@b.example', password: 'x'.repeat(200_000) })
    expect(huge.status).toBe(413)
  })

  it('refuses a state-changing request from another site (CSRF)', async () => {
    const body = { email: DEMO_ACCOUNTS.student.email, password: DEMO_PASSWORD }
    const c = new ApiClient()
    expect((await c.post('/api/auth/sign-in', body, { origin: 'http://elsewhere.example' })).status).toBe(403)
    expect((await c.post('/api/auth/sign-in', body, { 'sec-fetch-site': 'cross-site' })).status).toBe(403)
    expect((await c.post('/api/auth/sign-in', body, { origin: c.baseUrl, 'sec-fetch-site': 'same-origin' })).status).toBe(200)
  })

  it('limits failed attempts per address: 429 with Retry-After, and the right password waits too', async () => {
    const u = await makeUser('Rate Limited', { team: 'Copper Wrens' })
    const c = new ApiClient()
    for (let i = 0; i < 5; i++) expect((await c.post('/api/auth/sign-in', { email: u.email, password: 'wrong-password' })).status).toBe(401)
    const blocked = await c.post('/api/auth/sign-in', { email: u.email, password: u.password })
    expect(blocked.status).toBe(429)
    const retry = Number(blocked.headers.get('retry-after'))
    expect(retry).toBeGreaterThan(0)
    expect(retry).toBeLessThanOrEqual(15 * 60)
    const failures = await testDb().selectFrom('audit_event').select('action').where('subject_type', '=', 'user').where('subject_id', '=', String(u.id)).execute()
    expect(failures.filter((f) => f.action === 'sign-in-failed')).toHaveLength(5)
  })

  it('signs out', async () => {
    const c = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    expect((await c.post('/api/auth/sign-out')).status).toBe(204)
    expect((await c.get('/api/me')).status).toBe(401)
  })

  it('writes every sign-in to the audit table', async () => {
    const u = await makeUser('Audited Person', { team: 'Copper Wrens' })
    await signedIn(u.email, u.password)
    const rows = await testDb().selectFrom('audit_event').selectAll().where('action', '=', 'sign-in').where('subject_id', '=', String(u.id)).execute()
    expect(rows).toHaveLength(1)
    expect(rows[0]!.actor_id).toBe(u.id)
  })

  it('keeps a deactivated account out, and ends its open session at once', async () => {
    const u = await makeUser('Soon Deactivated', { team: 'Copper Wrens' })
    const theirs = await signedIn(u.email, u.password)
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const r = await mentor.patch(`/api/people/${u.id}`, { active: false })
    expect(r.status).toBe(200)
    expect(r.body.active).toBe(false)
    expect((await theirs.get('/api/me')).status).toBe(401)
    const again = await new ApiClient().post('/api/auth/sign-in', { email: u.email, password: u.password })
    expect(again.status).toBe(401)
    const audit = await testDb().selectFrom('audit_event').select(['action', 'actor_id']).where('action', '=', 'deactivate').where('subject_id', '=', String(u.id)).execute()
    expect(audit).toHaveLength(1)
  })
})
