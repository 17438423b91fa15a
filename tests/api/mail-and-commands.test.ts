import { describe, expect, it, inject } from 'vitest'
import { execFile } from 'node:child_process'
import { promisify } from 'node:util'
import { ApiClient, signedIn, uniqueEmail } from '../support/client'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { waitForMail } from '../support/mail'

const run = promisify(execFile)

describe('the mail fake page', () => {
  it('lists and shows the messages the fake received', async () => {
    await new ApiClient().post('/api/password-resets', { email: DEMO_ACCOUNTS.operator.email })
    await waitForMail(DEMO_ACCOUNTS.operator.email, /Reset/)
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const list = await mentor.get('/api/mail')
    expect(list.status).toBe(200)
    const item = list.body.find((m: any) => m.to.includes(DEMO_ACCOUNTS.operator.email))
    expect(item.subject).toBe('Reset your Decalwright password')
    const one = await mentor.get(`/api/mail/${item.id}`)
    expect(one.body.text).toContain('/reset/')
    expect(one.body.html).toContain('Choose a new password')
    expect((await mentor.get('/api/mail/..%2F..%2Fetc%2Fpasswd')).status).toBe(404)
  })
})

describe('npm run create-mentor', () => {
  it('makes a mentor and prints a one-time link that sets the password', async () => {
    const email = uniqueEmail('first.mentor')
    const { stdout } = await run(process.execPath, ['node_modules/tsx/dist/cli.mjs', 'scripts/create-mentor.ts', '--email', email, '--name', 'Rosalind Achterberg'], {
      env: { ...process.env, NUXT_DATABASE_URL: inject('databaseUrl'), NUXT_PUBLIC_BASE_URL: inject('baseUrl') },
    })
    const link = stdout.match(/https?:\/\/\S+\/reset\/\S+/)![0]
    const token = link.split('/').pop()!
    const guest = new ApiClient()
    expect((await guest.get(`/api/password-resets/${token}`)).body).toEqual({ email, purpose: 'welcome' })
    expect((await guest.post(`/api/password-resets/${token}`, { password: 'first-mentor-pw' })).body).toEqual({ home: '/program' })
    expect((await guest.get('/api/me')).body.isMentor).toBe(true)
    expect((await new ApiClient().get(`/api/password-resets/${token}`)).status).toBe(410)
    await expect(run(process.execPath, ['node_modules/tsx/dist/cli.mjs', 'scripts/create-mentor.ts', '--email', email, '--name', 'Again'], {
      env: { ...process.env, NUXT_DATABASE_URL: inject('databaseUrl') },
    })).rejects.toThrow(/already/)
  })
})
