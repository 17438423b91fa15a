// Sign-in, password resets and sessions under attack: limits that hold in parallel, that key
// on the real source (forwarded headers are trusted only from configured proxies), that slow a
// guesser without locking out the account's owner, resets that do not tell which addresses
// exist, and sessions that end when they should.
import { afterAll, describe, expect, it } from 'vitest'
import { ApiClient, signedIn, uniqueEmail } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { startExtraApp } from '../support/extra-app'
import { linkIn, mailTo, waitForMail } from '../support/mail'
import { makeUser } from '../support/people'

const stops: (() => Promise<void>)[] = []
afterAll(async () => { for (const s of stops.reverse()) await s() })

/** Each test takes its own loopback sources, so their counts do not meet. */
let nextSource = 10
function source(): string {
  return `127.0.${Math.floor(nextSource / 250) + 1}.${(nextSource++ % 250) + 2}`
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  return s[Math.floor(s.length / 2)]!
}

describe('sign-in limits', () => {
  it('hold when 100 wrong guesses arrive at once (the count and the check are one step)', async () => {
    const victim = await makeUser('Parallel Victim')
    const from = source()
    const replies = await Promise.all(Array.from({ length: 100 }, () =>
      new ApiClient(undefined, { source: from }).post('/api/auth/sign-in', { email: victim.email, password: 'not the password at all' })))
    const statuses = replies.map((r) => r.status)
    expect(statuses.filter((s) => s === 401).length).toBeLessThanOrEqual(5)
    expect(statuses.filter((s) => s === 429).length).toBeGreaterThanOrEqual(95)
    expect(statuses.every((s) => s === 401 || s === 429)).toBe(true)
  })

  it('never refuse the right password from a source that has not been guessing', async () => {
    const victim = await makeUser('Lockout Victim')
    const attacker = source()
    const answers: number[] = []
    for (let i = 0; i < 10; i++) {
      answers.push((await new ApiClient(undefined, { source: attacker }).post('/api/auth/sign-in', { email: victim.email, password: `guess number ${i}` })).status)
    }
    expect(answers.slice(0, 5)).toEqual([401, 401, 401, 401, 401])
    expect(answers.slice(5).every((s) => s === 429)).toBe(true)
    // The owner, from their own machine, gets in (perhaps a little slower, never refused).
    const owner = new ApiClient(undefined, { source: source() })
    const r = await owner.post('/api/auth/sign-in', { email: victim.email, password: victim.password })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
  })

  it('limit a source that guesses across many accounts', async () => {
    const from = source()
    const statuses: number[] = []
    for (let i = 0; i < 60; i++) {
      statuses.push((await new ApiClient(undefined, { source: from }).post('/api/auth/sign-in', { email: uniqueEmail('spray'), password: 'spray and pray' })).status)
    }
    expect(statuses.slice(0, 50).every((s) => s === 401)).toBe(true)
    expect(statuses.slice(50).every((s) => s === 429)).toBe(true)
  })
})

describe('forwarded headers', () => {
  it('are ignored unless the sender is a configured proxy', async () => {
    const user = await makeUser('Forwarded Person')
    const from = source()
    const c = new ApiClient(undefined, { source: from })
    // A forged address neither escapes the limit nor lands in the history.
    for (let i = 0; i < 5; i++) {
      expect((await c.post('/api/auth/sign-in', { email: user.email, password: 'wrong wrong' }, { 'x-forwarded-for': `203.0.113.${i + 1}` })).status).toBe(401)
    }
    expect((await c.post('/api/auth/sign-in', { email: user.email, password: 'wrong wrong' }, { 'x-forwarded-for': '203.0.113.99' })).status).toBe(429)
    const ips = await testDb().selectFrom('audit_event').select('ip').where('actor_id', '=', user.id).where('action', '=', 'sign-in-failed').execute()
    expect(ips.length).toBeGreaterThan(0)
    expect(ips.every((r) => r.ip === from)).toBe(true)
    // A forged host does not make another site's request look like our own.
    const signedInClient = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const forged = await signedInClient.post('/api/auth/sign-out', {}, { origin: 'http://evil.example', 'x-forwarded-host': 'evil.example' })
    expect(forged.status).toBe(403)
  })

  it('are trusted from a configured proxy', async () => {
    const app = await startExtraApp({ NUXT_TRUSTED_PROXIES: '127.0.0.1' })
    stops.push(app.stop)
    const user = await makeUser('Proxied Person')
    const c = new ApiClient(app.baseUrl)
    await c.post('/api/auth/sign-in', { email: user.email, password: user.password }, { 'x-forwarded-for': '198.51.100.7' })
    const row = await testDb().selectFrom('audit_event').select('ip').where('actor_id', '=', user.id).where('action', '=', 'sign-in').executeTakeFirstOrThrow()
    expect(row.ip).toBe('198.51.100.7')
  })
})

describe('password-reset requests', () => {
  it('answer alike for known and unknown addresses, and send mail after answering', async () => {
    const known = await Promise.all(Array.from({ length: 8 }, (_, i) => makeUser(`Reset Timing ${i}`)))
    const kt: number[] = []
    const ut: number[] = []
    for (let i = 0; i < known.length; i++) {
      for (const [email, bucket] of [[known[i]!.email, kt], [uniqueEmail('nobody'), ut]] as const) {
        const t0 = performance.now()
        const r = await new ApiClient(undefined, { source: source() }).post('/api/password-resets', { email })
        bucket.push(performance.now() - t0)
        expect(r.status).toBe(202)
      }
    }
    // Today a known address took ~110 ms (mail sent before answering) and an unknown one ~3 ms.
    expect(Math.abs(median(kt) - median(ut))).toBeLessThan(25)
    await waitForMail(known[0]!.email, /Reset/)
  })

  it('send at most three mails an hour to one address, and limit each source', async () => {
    const user = await makeUser('Reset Flood')
    for (let i = 0; i < 8; i++) {
      expect((await new ApiClient(undefined, { source: source() }).post('/api/password-resets', { email: user.email })).status).toBe(202)
    }
    await waitForMail(user.email, /Reset/)
    await new Promise((r) => setTimeout(r, 1500))
    expect((await mailTo(user.email)).length).toBe(3)
    const from = source()
    const statuses: number[] = []
    for (let i = 0; i < 12; i++) statuses.push((await new ApiClient(undefined, { source: from }).post('/api/password-resets', { email: uniqueEmail('flood') })).status)
    expect(statuses.slice(0, 10).every((s) => s === 202)).toBe(true)
    expect(statuses.slice(10).every((s) => s === 429)).toBe(true)
  })
})

describe('sessions', () => {
  function copy(c: ApiClient): ApiClient {
    const twin = new ApiClient()
    for (const [k, v] of c.cookies) twin.cookies.set(k, v)
    return twin
  }

  it('end at sign-out, even for a copied cookie', async () => {
    const user = await makeUser('Cookie Copier')
    const c = await signedIn(user.email, user.password)
    const stolen = copy(c)
    expect((await stolen.get('/api/me')).status).toBe(200)
    expect((await c.post('/api/auth/sign-out')).status).toBeLessThan(300)
    expect((await stolen.get('/api/me')).status).toBe(401)
  })

  it('all end when the password is reset', async () => {
    const user = await makeUser('Reset Everywhere')
    const laptop = await signedIn(user.email, user.password)
    await new ApiClient(undefined, { source: source() }).post('/api/password-resets', { email: user.email })
    const token = linkIn(await waitForMail(user.email, /Reset/), '/reset/').split('/').pop()!
    const phone = new ApiClient()
    expect((await phone.post(`/api/password-resets/${token}`, { password: 'a brand new password' })).status).toBe(200)
    expect((await laptop.get('/api/me')).status).toBe(401)
    expect((await phone.get('/api/me')).status).toBe(200)
  })

  it('all end when a mentor signs a person out everywhere, and when the person is deactivated', async () => {
    const user = await makeUser('Lost Laptop', { team: 'Copper Wrens' })
    const a = await signedIn(user.email, user.password)
    const b = await signedIn(user.email, user.password)
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    expect((await student.post(`/api/people/${user.id}/sign-out-everywhere`)).status).toBe(403)
    expect((await mentor.post(`/api/people/${user.id}/sign-out-everywhere`)).status).toBe(204)
    expect((await a.get('/api/me')).status).toBe(401)
    expect((await b.get('/api/me')).status).toBe(401)
    const c = await signedIn(user.email, user.password)
    expect((await mentor.patch(`/api/people/${user.id}`, { active: false })).status).toBe(200)
    expect((await mentor.patch(`/api/people/${user.id}`, { active: true })).status).toBe(200)
    // Reactivation does not bring an ended session back.
    expect((await c.get('/api/me')).status).toBe(401)
  })
})
