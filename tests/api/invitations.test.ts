import { describe, expect, it } from 'vitest'
import { sql } from 'kysely'
import { ApiClient, signedIn, uniqueEmail } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { linkIn, mailTo, waitForMail } from '../support/mail'

async function teamId(name: string) {
  return (await testDb().selectFrom('team').select('id').where('name', '=', name).executeTakeFirstOrThrow()).id
}

function tokenOf(link: string) {
  return new URL(link).pathname.split('/').pop()!
}

describe('invitations', () => {
  it('a mentor invites a designer; the mail arrives; the link sets a password and signs them in', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const email = uniqueEmail('new.designer')
    const wrens = await teamId('Copper Wrens')
    const created = await mentor.post('/api/invitations', { email, name: 'Nell Varga-Sato', role: 'designer', teamId: wrens })
    expect(created.status).toBe(201)
    expect(created.body).toMatchObject({ email, role: 'designer', teamId: wrens, teamName: 'Copper Wrens', invitedBy: DEMO_ACCOUNTS.mentor.name })

    const mail = await waitForMail(email, /invited/)
    expect(mail.text).toContain('Copper Wrens')
    expect(mail.html).toContain('Accept and set your password')
    const link = linkIn(mail, '/invitations/')
    const token = tokenOf(link)

    // Stored hashed: the token itself is nowhere in the database.
    const stored = await testDb().selectFrom('invitation').select('token_hash').where('email', '=', email).executeTakeFirstOrThrow()
    expect(stored.token_hash).not.toContain(token)
    expect(stored.token_hash).toMatch(/^[0-9a-f]{64}$/)

    const guest = new ApiClient()
    const preview = await guest.get(`/api/invitations/by-token/${token}`)
    expect(preview.status).toBe(200)
    expect(preview.body).toEqual({ email, name: 'Nell Varga-Sato', role: 'designer', teamName: 'Copper Wrens', programName: 'Harbourline Robotics' })

    const short = await guest.post(`/api/invitations/by-token/${token}/accept`, { password: 'short' })
    expect(short.status).toBe(400)
    expect(short.body.data.fieldErrors.password[0]).toMatch(/at least 10/)

    const accepted = await guest.post(`/api/invitations/by-token/${token}/accept`, { password: 'brand-new-password' })
    expect(accepted.status).toBe(200)
    expect(accepted.body).toEqual({ home: '/studio' })
    const me = await guest.get('/api/me')
    expect(me.body.user.email).toBe(email)
    expect(me.body.teams).toEqual([expect.objectContaining({ name: 'Copper Wrens', role: 'designer' })])

    // Single use.
    expect((await new ApiClient().get(`/api/invitations/by-token/${token}`)).status).toBe(410)
    expect((await new ApiClient().post(`/api/invitations/by-token/${token}/accept`, { password: 'another-password' })).status).toBe(410)
    // And the new password works on its own.
    await signedIn(email, 'brand-new-password')
    const invited = await testDb().selectFrom('audit_event').select('action').where('action', '=', 'invite').where(sql<string>`detail->>'email'`, '=', email).execute()
    expect(invited).toHaveLength(1)
    const accepted2 = await testDb().selectFrom('audit_event').select('actor_id').where('action', '=', 'accept-invitation').where('actor_id', '=', me.body.user.id).execute()
    expect(accepted2).toHaveLength(1)
  })

  it('invites a mentor without a team and needs a team for every other role', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const noTeam = await mentor.post('/api/invitations', { email: uniqueEmail('x'), name: 'No Team', role: 'student' })
    expect(noTeam.status).toBe(400)
    expect(noTeam.body.data.fieldErrors.teamId).toEqual(['Choose the team this person joins.'])
    const email = uniqueEmail('new.mentor')
    const r = await mentor.post('/api/invitations', { email, name: 'Wilhelmina Ostrander', role: 'mentor' })
    expect(r.status).toBe(201)
    const token = tokenOf(linkIn(await waitForMail(email, /invited/), '/invitations/'))
    const guest = new ApiClient()
    expect((await guest.post(`/api/invitations/by-token/${token}/accept`, { password: 'mentor-password-1' })).body).toEqual({ home: '/program' })
    expect((await guest.get('/api/me')).body.isMentor).toBe(true)
  })

  it('refuses bad input with field errors and sends no mail', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const r = await mentor.post('/api/invitations', { email: 'not-an-address', name: '', role: 'pilot', teamId: 1 })
    expect(r.status).toBe(400)
    expect(Object.keys(r.body.data.fieldErrors).sort()).toEqual(['email', 'name', 'role'])
    const existing = await mentor.post('/api/invitations', { email: DEMO_ACCOUNTS.student.email, name: 'Again', role: 'student', teamId: await teamId('Copper Wrens') })
    expect(existing.status).toBe(409)
    expect(existing.body.data.fieldErrors.email).toBeDefined()
    expect(await mailTo('not-an-address')).toHaveLength(0)
  })

  it('answers 410 for an expired link and 404 for an unknown one', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const email = uniqueEmail('late')
    await mentor.post('/api/invitations', { email, name: 'Late Comer', role: 'operator', teamId: await teamId('Tidewater Sprockets') })
    const token = tokenOf(linkIn(await waitForMail(email, /invited/), '/invitations/'))
    await testDb().updateTable('invitation').set({ expires_at: new Date(Date.now() - 1000) }).where('email', '=', email).execute()
    const r = await new ApiClient().get(`/api/invitations/by-token/${token}`)
    expect(r.status).toBe(410)
    expect(r.body.message).toMatch(/expired or was already used/)
    expect((await new ApiClient().get('/api/invitations/by-token/made-up-token')).status).toBe(404)
    // Nothing was created for the expired link.
    expect((await new ApiClient().post(`/api/invitations/by-token/${token}/accept`, { password: 'some-password-x' })).status).toBe(410)
    expect(await testDb().selectFrom('users').select('id').where('email', '=', email).executeTakeFirst()).toBeUndefined()
  })

  it('lets a mentor withdraw an invitation, which kills its link', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const email = uniqueEmail('withdrawn')
    const created = await mentor.post('/api/invitations', { email, name: 'Never Joined', role: 'student', teamId: await teamId('Copper Wrens') })
    const token = tokenOf(linkIn(await waitForMail(email, /invited/), '/invitations/'))
    expect((await mentor.get('/api/invitations')).body.map((i: any) => i.email)).toContain(email)
    expect((await mentor.delete(`/api/invitations/${created.body.id}`)).status).toBe(204)
    expect((await mentor.get('/api/invitations')).body.map((i: any) => i.email)).not.toContain(email)
    expect((await new ApiClient().get(`/api/invitations/by-token/${token}`)).status).toBe(410)
  })
})
