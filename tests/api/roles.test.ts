import { describe, expect, it, beforeAll } from 'vitest'
import { ApiClient, signedIn, uniqueEmail } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { hashPassword } from '../../server/platform/passwords'

// A second program on the same installation, to prove that its things do not exist for us.
let other: { teamId: number; mentorEmail: string; personId: number }
beforeAll(async () => {
  const db = testDb()
  const program = await db.insertInto('program').values({ name: `Other program ${Date.now()}`, school: 'Elsewhere Academy' }).returning('id').executeTakeFirstOrThrow()
  const team = await db.insertInto('team').values({ program_id: program.id, name: 'Far Team', colour: '#123456' }).returning('id').executeTakeFirstOrThrow()
  const mentorEmail = uniqueEmail('other.mentor')
  const mentor = await db.insertInto('users').values({ program_id: program.id, email: mentorEmail, name: 'Other Mentor', password_hash: await hashPassword('other-password-1') }).returning('id').executeTakeFirstOrThrow()
  await db.insertInto('mentorship').values({ user_id: mentor.id, program_id: program.id }).execute()
  other = { teamId: team.id, mentorEmail, personId: mentor.id }
})

async function teamId(name: string) {
  return (await testDb().selectFrom('team').select('id').where('name', '=', name).executeTakeFirstOrThrow()).id
}

describe('who may do what', () => {
  it('answers 401 before looking at the input when signed out', async () => {
    const guest = new ApiClient()
    for (const [method, path] of [['GET', '/api/teams'], ['POST', '/api/teams'], ['GET', '/api/people'], ['POST', '/api/invitations'], ['GET', '/api/audit'], ['GET', '/api/mail']] as const) {
      const r = await guest.request(method, path, method === 'POST' ? '{not json' : undefined)
      expect(r.status, `${method} ${path}`).toBe(401)
    }
  })

  it('answers 403 to a student or designer doing a mentor\'s work, before validating it', async () => {
    for (const role of ['student', 'designer', 'operator'] as const) {
      const c = await signedIn(DEMO_ACCOUNTS[role].email, DEMO_PASSWORD)
      expect((await c.get('/api/people')).status).toBe(403)
      expect((await c.post('/api/teams', '{broken')).status).toBe(403)
      expect((await c.post('/api/invitations', { email: 'x@y.example', name: 'X', role: 'mentor' })).status).toBe(403)
      expect((await c.get('/api/audit')).status).toBe(403)
      // Their own mail, not the program's outbox.
      expect((await c.get('/api/mail')).status).toBe(200)
      expect((await c.get('/api/outbox')).status).toBe(403)
    }
  })

  it('shows a member their own team and answers 404 for a team they are not in', async () => {
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const own = await student.get(`/api/teams/${await teamId('Copper Wrens')}`)
    expect(own.status).toBe(200)
    // Team-mates by name: their addresses are for those who manage people.
    expect(own.body.members.map((m: any) => m.name)).toContain(DEMO_ACCOUNTS.designer.name)
    expect(own.body.invitations).toEqual([])
    expect((await student.get(`/api/teams/${await teamId('Tidewater Sprockets')}`)).status).toBe(404)
    const teams = await student.get('/api/teams')
    expect(teams.body.map((t: any) => t.name)).toEqual(['Copper Wrens'])
  })

  it('answers 404 for another program\'s team and people, even to a mentor', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    expect((await mentor.get(`/api/teams/${other.teamId}`)).status).toBe(404)
    expect((await mentor.patch(`/api/teams/${other.teamId}`, { name: 'Taken over' })).status).toBe(404)
    expect((await mentor.patch(`/api/people/${other.personId}`, { active: false })).status).toBe(404)
    expect((await mentor.put(`/api/people/${other.personId}/memberships/${await teamId('Copper Wrens')}`, { role: 'student' })).status).toBe(404)
    expect((await mentor.get('/api/people')).body.map((p: any) => p.email)).not.toContain(other.mentorEmail)
    const otherMentor = await signedIn(other.mentorEmail, 'other-password-1')
    expect((await otherMentor.get(`/api/teams/${await teamId('Copper Wrens')}`)).status).toBe(404)
    expect((await otherMentor.get('/api/teams')).body.map((t: any) => t.name)).toEqual(['Far Team'])
    const bad = await otherMentor.post('/api/invitations', { email: uniqueEmail('sneaky'), name: 'Sneaky', role: 'student', teamId: await teamId('Copper Wrens') })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fieldErrors.teamId).toBeDefined()
  })

  it('a mentor creates a team, adds a person to it and changes their role; every change is audited', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const name = `Quarry Finches ${Date.now()}`
    const created = await mentor.post('/api/teams', { name, number: 'HL-9', colour: '#336699' })
    expect(created.status).toBe(201)
    expect(created.body).toMatchObject({ name, number: 'HL-9', colour: '#336699', memberCount: 0 })
    const dup = await mentor.post('/api/teams', { name: name.toUpperCase(), colour: '#336699' })
    expect(dup.status).toBe(409)
    const invalid = await mentor.post('/api/teams', { name: ' ', colour: 'red' })
    expect(invalid.status).toBe(400)
    expect(Object.keys(invalid.body.data.fieldErrors).sort()).toEqual(['colour', 'name'])

    const people = (await mentor.get('/api/people')).body
    const student = people.find((p: any) => p.email === DEMO_ACCOUNTS.student.email)
    const added = await mentor.put(`/api/people/${student.id}/memberships/${created.body.id}`, { role: 'student' })
    expect(added.status).toBe(200)
    const changed = await mentor.put(`/api/people/${student.id}/memberships/${created.body.id}`, { role: 'designer' })
    expect(changed.body.memberships).toContainEqual({ teamId: created.body.id, teamName: name, role: 'designer' })
    const asStudent = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    expect((await asStudent.get('/api/me')).body.roles.sort()).toEqual(['designer', 'student'])
    const removed = await mentor.delete(`/api/people/${student.id}/memberships/${created.body.id}`)
    expect(removed.body.memberships.map((m: any) => m.teamId)).not.toContain(created.body.id)
    const bad = await mentor.put(`/api/people/${student.id}/memberships/${created.body.id}`, { role: 'captain' })
    expect(bad.status).toBe(400)
    expect(bad.body.data.fieldErrors.role).toBeDefined()

    const audit = (await mentor.get('/api/audit?limit=20')).body.items
    const mine = audit.filter((a: any) => a.detail?.team === name || a.detail?.name === name)
    expect(mine.map((a: any) => a.action).sort()).toEqual(['change-role', 'change-role', 'change-role', 'create-team'])
  })

  it('a mentor cannot deactivate themselves', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const me = (await mentor.get('/api/me')).body
    expect((await mentor.patch(`/api/people/${me.user.id}`, { active: false })).status).toBe(409)
  })

  it('answers JSON 404 for an unknown API path and for ids that are not ids', async () => {
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const r = await mentor.get('/api/no-such-thing')
    expect(r.status).toBe(404)
    expect(r.body.message).toBeDefined()
    expect((await mentor.get('/api/teams/abc')).status).toBe(404)
  })
})
