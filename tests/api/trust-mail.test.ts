// Mail: each person reads only their own messages in the local fake's view, the view is gone
// with real SMTP, and mail is written to an outbox in the change's own transaction and sent
// after commit, with retries, so a mail server that is down loses nothing and blocks nothing.
import { mkdtempSync, readdirSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { afterAll, describe, expect, it } from 'vitest'
import { startSmtpFake } from '../../scripts/lib/services'
import { ApiClient, signedIn, uniqueEmail } from '../support/client'
import { freshDatabase } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { sparePort, startExtraApp } from '../support/extra-app'
import { otherProgramMentor } from '../support/scenario'
import { waitForMail } from '../support/mail'

const stops: (() => Promise<void>)[] = []
afterAll(async () => { for (const s of stops.reverse()) await s() })

async function waitFor<T>(what: string, probe: () => Promise<T | undefined | false>, timeoutMs = 20_000): Promise<T> {
  const deadline = Date.now() + timeoutMs
  for (;;) {
    const v = await probe()
    if (v) return v
    if (Date.now() > deadline) throw new Error(`timed out waiting for ${what}`)
    await new Promise((r) => setTimeout(r, 200))
  }
}

describe('the mail view of the local fake', () => {
  it('shows each person only the messages addressed to them', async () => {
    await new ApiClient().post('/api/password-resets', { email: DEMO_ACCOUNTS.operator.email })
    await waitForMail(DEMO_ACCOUNTS.operator.email, /Reset/)
    const operator = await signedIn(DEMO_ACCOUNTS.operator.email, DEMO_PASSWORD)
    const own = await operator.get('/api/mail')
    expect(own.status).toBe(200)
    const reset = own.body.find((m: any) => /Reset/.test(m.subject))
    expect(reset).toBeTruthy()
    expect(own.body.every((m: any) => m.to.includes(DEMO_ACCOUNTS.operator.email))).toBe(true)
    expect((await operator.get(`/api/mail/${reset.id}`)).body.text).toContain('/reset/')

    // A mentor of the same program does not read another person's one-time link …
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const mentorsOwn = (await mentor.get('/api/mail')).body
    expect(mentorsOwn.some((m: any) => m.id === reset.id)).toBe(false)
    expect((await mentor.get(`/api/mail/${reset.id}`)).status).toBe(404)
    // … nor does a mentor of another program who asked for that reset.
    const far = await otherProgramMentor('Mailreader')
    await new ApiClient().post('/api/password-resets', { email: DEMO_ACCOUNTS.operator.email })
    const farList = (await far.client.get('/api/mail')).body
    expect(farList.some((m: any) => m.to.includes(DEMO_ACCOUNTS.operator.email))).toBe(false)
    expect((await far.client.get(`/api/mail/${reset.id}`)).status).toBe(404)
    expect((await far.client.get('/api/mail/..%2F..%2Fetc%2Fpasswd')).status).toBe(404)
  })

  it('does not exist when real SMTP is configured', async () => {
    const app = await startExtraApp({ NUXT_MAIL_OUTBOX_DIR: undefined })
    stops.push(app.stop)
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD, { baseUrl: app.baseUrl })
    expect((await mentor.get('/api/mail')).status).toBe(404)
    expect((await mentor.get('/api/me')).body.mailFake).toBe(false)
  })
})

describe('the outbox', () => {
  it('keeps mail while the SMTP server is down, shows the failure to mentors, and sends it when the server is back', async () => {
    const smtpPort = await sparePort()
    const app = await startExtraApp({
      NUXT_DATABASE_URL: await freshDatabase('outbox'),
      NUXT_SMTP_URL: `smtp://127.0.0.1:${smtpPort}`,
      NUXT_MAIL_OUTBOX_DIR: undefined,
      NUXT_MAIL_RETRY_BASE_MS: '200',
    })
    stops.push(app.stop)
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD, { baseUrl: app.baseUrl })
    const email = uniqueEmail('outbox.invitee')
    const invited = await mentor.post('/api/invitations', { email, name: 'Oona Brightwater', role: 'mentor' })
    // The change is made and answered although no mail could go out.
    expect(invited.status, JSON.stringify(invited.body)).toBe(201)
    const failing = await waitFor('the failure to show', async () => {
      const r = (await mentor.get('/api/outbox')).body
      return r.failing?.length ? r : undefined
    })
    expect(failing.failing[0]).toMatchObject({ to: email, subject: expect.stringMatching(/invit/i) })
    expect(failing.failing[0].attempts).toBeGreaterThan(0)
    expect(failing.failing[0].lastError).toBeTruthy()
    // A student may not see the program's outbox.
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD, { baseUrl: app.baseUrl })
    expect((await student.get('/api/outbox')).status).toBe(403)

    const dir = mkdtempSync(path.join(os.tmpdir(), 'dw-outbox-'))
    const smtp = await startSmtpFake({ dir, port: smtpPort })
    stops.push(smtp.stop)
    await waitFor('the message to be delivered', async () => readdirSync(dir).length > 0)
    const after = await waitFor('the outbox to be clear', async () => {
      const r = (await mentor.get('/api/outbox')).body
      return r.failing.length === 0 && r.waiting === 0 ? r : undefined
    })
    expect(after.failing).toEqual([])
    expect(readdirSync(dir)).toHaveLength(1)
  })
})
