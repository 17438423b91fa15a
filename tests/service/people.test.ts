import { describe, expect } from 'vitest'
import { createTeam, findPerson, listPeople, listTeams, setMembership, teamDetail, updatePerson, updateTeam } from '../../server/people/service'
import { acceptInvitation, createInvitation, listInvitations } from '../../server/people/invitations'
import { teamInScope } from '../../server/people/queries'
import { loadActor } from '../../server/auth/service'
import { actorOf, statusOf, test } from '../support/service'
import { buildProgram } from '../support/fixtures'

describe('teams and people', () => {
  test('each person sees the teams the policy lets them see; mentors create and rename teams', async ({ trx }) => {
    const p = await buildProgram(trx)
    const far = await buildProgram(trx)
    const [a, b] = p.teams
    const mentor = await actorOf(trx, p.mentor)
    expect((await listTeams(trx, mentor)).map((t) => t.id).sort()).toEqual([a.id, b.id].sort())
    const student = await actorOf(trx, a.student)
    expect(await listTeams(trx, student)).toEqual([expect.objectContaining({ id: a.id, memberCount: 3, myRole: 'student' })])
    expect(await teamInScope(trx, student, b.id)).toBeUndefined()
    expect(await teamInScope(trx, mentor, far.teams[0].id)).toBeUndefined()
    const created = await createTeam(trx, mentor, { name: 'Quarry Finches', number: 'HL-9', colour: '#336699' })
    expect(await statusOf(createTeam(trx, mentor, { name: 'QUARRY FINCHES', number: null, colour: '#336699' }))).toBe(409)
    const renamed = await updateTeam(trx, mentor, created.id, { name: 'Quarry Wrens' })
    expect(renamed.team.name).toBe('Quarry Wrens')
    expect(renamed.can).toEqual({ 'team.manage': true, 'people.manage': true })
    expect(await statusOf(updateTeam(trx, mentor, far.teams[0].id, { name: 'Taken over' }))).toBe(404)
    // A member's view of the team page holds no invitations and no management.
    const own = await teamDetail(trx, student, (await teamInScope(trx, student, a.id))!)
    expect(own.can).toEqual({ 'team.manage': false, 'people.manage': false })
    expect(own.members.map((m) => m.userId).sort()).toEqual([a.student, a.designer, a.operator].sort())
  })

  test('a mentor changes roles, with the history of each change; roles take effect at once', async ({ trx }) => {
    const p = await buildProgram(trx)
    const [a, b] = p.teams
    const mentor = await actorOf(trx, p.mentor)
    const added = await setMembership(trx, mentor, a.student, b.id, 'designer')
    expect(added.memberships).toContainEqual({ teamId: b.id, teamName: b.name, role: 'designer' })
    expect((await loadActor(trx, a.student, null))!.memberships.get(b.id)).toBe('designer')
    const removed = await setMembership(trx, mentor, a.student, b.id, null)
    expect(removed.memberships.map((m) => m.teamId)).toEqual([a.id])
    const lines = await trx.selectFrom('audit_event').select(['action', 'detail']).where('subject_type', '=', 'user').where('subject_id', '=', String(a.student)).orderBy('id').execute()
    expect(lines.map((l) => [l.action, (l.detail as { to?: string }).to])).toEqual([['change-role', 'designer'], ['change-role', null]])
  })

  test('deactivation ends reset links; nobody deactivates themselves; another program\'s people do not exist', async ({ trx }) => {
    const p = await buildProgram(trx)
    const far = await buildProgram(trx)
    const mentor = await actorOf(trx, p.mentor)
    const who = p.teams[0].designer
    await trx.insertInto('password_reset').values({ user_id: who, token_hash: 'a'.repeat(64), purpose: 'reset', expires_at: new Date(Date.now() + 60_000) }).execute()
    expect((await updatePerson(trx, mentor, who, { active: false })).active).toBe(false)
    expect(await loadActor(trx, who, null)).toBeUndefined()
    const open = await trx.selectFrom('password_reset').select('id').where('user_id', '=', who).where('used_at', 'is', null).execute()
    expect(open).toEqual([])
    expect(await statusOf(updatePerson(trx, mentor, p.mentor, { active: false }))).toBe(409)
    expect(await statusOf(findPerson(trx, mentor, far.mentor))).toBe(404)
    expect((await listPeople(trx, mentor)).map((x) => x.id)).not.toContain(far.mentor)
  })

  test('an invitation is mailed, names only the program\'s teams, and its link makes the account', async ({ trx, mail }) => {
    const p = await buildProgram(trx)
    const far = await buildProgram(trx)
    const mentor = await actorOf(trx, p.mentor)
    const email = `invited.${Date.now()}@fixtures.example`
    const invitation = await createInvitation(trx, mentor, { email, name: 'Invited Person', role: 'designer', teamId: p.teams[1].id })
    expect(invitation).toMatchObject({ email, teamName: p.teams[1].name, invitedBy: mentor.name })
    expect((await listInvitations(trx, mentor)).map((i) => i.id)).toEqual([invitation.id])
    const queued = await mail.queued(p.id)
    expect(queued.map((m) => m.to)).toEqual([[email]])
    const token = /\/invitations\/([\w-]+)/.exec(queued[0]!.text)![1]!
    const bad = createInvitation(trx, mentor, { email: `x${email}`, name: 'X', role: 'student', teamId: far.teams[0].id })
    await expect(bad).rejects.toMatchObject({ statusCode: 400, data: { fieldErrors: { teamId: [expect.any(String)] } } })
    const userId = await acceptInvitation(trx, token, { password: 'a-long-enough-password' }, null)
    expect((await loadActor(trx, userId, null))!.memberships.get(p.teams[1].id)).toBe('designer')
    expect(await statusOf(acceptInvitation(trx, token, { password: 'a-long-enough-password' }, null))).toBe(410)
  })
})
