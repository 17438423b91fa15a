import { describe, expect, it } from 'vitest'
import { ApiClient, uniqueEmail } from '../support/client'
import { testDb } from '../support/db'
import { linkIn, mailTo, waitForMail } from '../support/mail'
import { makeUser as makePerson } from '../support/people'

async function makeUser(name: string) {
  return (await makePerson(name, { password: 'the-old-password' })).email
}

describe('password reset by e-mail', () => {
  it('mails a single-use link that sets a new password', async () => {
    const email = await makeUser('Forgetful Person')
    const guest = new ApiClient()
    const asked = await guest.post('/api/password-resets', { email })
    expect(asked.status).toBe(202)
    const mail = await waitForMail(email, /Reset your Decalwright password/)
    expect(mail.text).toMatch(/expires in one hour/)
    const token = new URL(linkIn(mail, '/reset/')).pathname.split('/').pop()!
    expect((await guest.get(`/api/password-resets/${token}`)).body).toEqual({ email, purpose: 'reset' })
    const done = await guest.post(`/api/password-resets/${token}`, { password: 'the-new-password' })
    expect(done.status).toBe(200)
    expect((await guest.get('/api/me')).body.user.email).toBe(email)
    expect((await new ApiClient().post('/api/auth/sign-in', { email, password: 'the-old-password' })).status).toBe(401)
    expect((await new ApiClient().post('/api/auth/sign-in', { email, password: 'the-new-password' })).status).toBe(200)
    expect((await new ApiClient().post(`/api/password-resets/${token}`, { password: 'a-third-password' })).status).toBe(410)
  })

  it('answers the same for an unknown address and sends nothing', async () => {
    const email = uniqueEmail('unknown')
    const r = await new ApiClient().post('/api/password-resets', { email })
    expect(r.status).toBe(202)
    await new Promise((res) => setTimeout(res, 300))
    expect(await mailTo(email)).toHaveLength(0)
  })

  it('refuses an expired link', async () => {
    const email = await makeUser('Slow Reader')
    await new ApiClient().post('/api/password-resets', { email })
    const token = new URL(linkIn(await waitForMail(email, /Reset/), '/reset/')).pathname.split('/').pop()!
    const user = await testDb().selectFrom('users').select('id').where('email', '=', email).executeTakeFirstOrThrow()
    await testDb().updateTable('password_reset').set({ expires_at: new Date(Date.now() - 1) }).where('user_id', '=', user.id).execute()
    expect((await new ApiClient().post(`/api/password-resets/${token}`, { password: 'whatever-password' })).status).toBe(410)
  })
})
