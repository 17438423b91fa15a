import { describe, expect, it } from 'vitest'
import { actorRoles, can, flags, teamsFor, type Actor } from '../../../server/policy'
import { homeFor } from '../../../server/auth/home'
import { PROGRAM_ACTIONS, TEAM_ACTIONS, type TeamAction } from '../../../shared/types/policy'
import type { MemberRole } from '../../../shared/types/roles'

function actor(roles: [number, MemberRole][], isMentor = false): Actor {
  return { id: 1, name: 'A', email: 'a@x.example', programId: 1, isMentor, memberships: new Map(roles), ip: null }
}

const OWN = { teamId: 7, programId: 1 }
const OTHER = { teamId: 8, programId: 1 }
const FAR = { teamId: 9, programId: 2 }
const people = {
  student: actor([[7, 'student']]),
  designer: actor([[7, 'designer']]),
  operator: actor([[7, 'operator']]),
  mentor: actor([], true),
}
type Who = keyof typeof people

// The rules written out by hand, one letter per person who may: Student, Designer, Operator, Mentor.
const IN_OWN_TEAM: Record<TeamAction, string> = {
  'team.view': 'SDOM',
  'team.members': 'SD-M',
  'artwork.view': 'SDOM',
  'artwork.upload': 'SD-M',
  'artwork.revise': '-D-M',
  'revision.submit': 'SD-M',
  'robot.view': 'SDOM',
  'placement.create': '-D-M',
  'placement.edit': '-D-M',
  'placement.reprint': 'SDOM',
  'robot.edit': '-D-M',
  // Operators work the whole program's queue.
  'job.view': 'SDOM',
}
const IN_OTHER_TEAM: Record<TeamAction, string> = {
  ...Object.fromEntries(TEAM_ACTIONS.map((a) => [a, '---M'])) as Record<TeamAction, string>,
  'job.view': '--OM',
}
const LETTER: Record<Who, string> = { student: 'S', designer: 'D', operator: 'O', mentor: 'M' }
const allowed = (rule: string, who: Who) => rule.includes(LETTER[who])

describe('the policy', () => {
  it.each(Object.keys(people) as Who[])('answers for a %s in their own team, another team and another program', (who) => {
    for (const action of TEAM_ACTIONS) {
      expect(can(people[who], action, OWN), `${action} own`).toBe(allowed(IN_OWN_TEAM[action], who))
      expect(can(people[who], action, OTHER), `${action} other`).toBe(allowed(IN_OTHER_TEAM[action], who))
      expect(can(people[who], action, FAR), `${action} far`).toBe(false)
    }
  })

  it('gives program work to mentors, the cut queue and test cuts to operators as well, and everyone their own mail', () => {
    for (const action of PROGRAM_ACTIONS) {
      // One's own mail is everyone's.
      const anyone = action === 'mail.view'
      expect(can(people.mentor, action)).toBe(true)
      expect(can(people.student, action), action).toBe(anyone)
      expect(can(people.designer, action), action).toBe(anyone)
      expect(can(people.operator, action), action).toBe(anyone || action === 'queue.work' || action === 'film.test')
    }
  })

  it('answers a team action without a subject as "in any team"', () => {
    expect(can(people.designer, 'artwork.revise')).toBe(true)
    expect(can(people.student, 'artwork.revise')).toBe(false)
    expect(can(actor([[7, 'operator'], [8, 'designer']]), 'placement.create')).toBe(true)
    expect(can(actor([]), 'artwork.view')).toBe(false)
  })

  it('lists the teams an action reaches, or all of them', () => {
    const both = actor([[7, 'student'], [8, 'operator']])
    expect(teamsFor(both, 'artwork.upload')).toEqual([7])
    expect(teamsFor(both, 'artwork.view')?.sort()).toEqual([7, 8])
    expect(teamsFor(both, 'job.view')).toBeNull()
    expect(teamsFor(people.mentor, 'placement.create')).toBeNull()
    expect(teamsFor(people.student, 'job.view')).toEqual([7])
  })

  it('hands out flags under the actions\' own names', () => {
    expect(flags(people.designer, ['artwork.revise', 'revision.submit', 'revision.review'], OWN))
      .toEqual({ 'artwork.revise': true, 'revision.submit': true, 'revision.review': false })
  })

  it('lists the distinct roles a person holds', () => {
    expect(actorRoles(actor([[1, 'student'], [2, 'student']], true)).sort()).toEqual(['mentor', 'student'])
  })

  it('sends each role to its own home page', () => {
    expect(homeFor(actor([[1, 'operator']], true))).toBe('/program')
    expect(homeFor(actor([[1, 'operator']]))).toBe('/lab')
    expect(homeFor(actor([[1, 'designer']]))).toBe('/studio')
    expect(homeFor(actor([[1, 'student'], [2, 'operator']]))).toBe('/studio')
  })
})
