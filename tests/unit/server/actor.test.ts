import { describe, expect, it } from 'vitest'
import { actorRoles, canActInTeam, homeFor, type Actor } from '../../../server/utils/actor'

function actor(o: Partial<Actor> & { roles?: [number, 'student' | 'designer' | 'operator'][] }): Actor {
  return { id: 1, name: 'A', email: 'a@x.example', programId: 1, isMentor: false, memberships: new Map(o.roles ?? []), ...o }
}

describe('roles', () => {
  it('sends each role to its own home page', () => {
    expect(homeFor(actor({ isMentor: true, roles: [[1, 'operator']] }))).toBe('/program')
    expect(homeFor(actor({ roles: [[1, 'operator']] }))).toBe('/lab')
    expect(homeFor(actor({ roles: [[1, 'designer']] }))).toBe('/studio')
    expect(homeFor(actor({ roles: [[1, 'student'], [2, 'operator']] }))).toBe('/studio')
  })

  it('lets a designer do what a student does, but not an operator\'s work, and only in their team', () => {
    const d = actor({ roles: [[7, 'designer']] })
    expect(canActInTeam(d, 7, 'student')).toBe(true)
    expect(canActInTeam(d, 7, 'designer')).toBe(true)
    expect(canActInTeam(d, 7, 'operator')).toBe(false)
    expect(canActInTeam(d, 8, 'student')).toBe(false)
    const s = actor({ roles: [[7, 'student']] })
    expect(canActInTeam(s, 7, 'designer')).toBe(false)
    expect(canActInTeam(actor({ isMentor: true }), 99, 'operator')).toBe(true)
  })

  it('lists the distinct roles a person holds', () => {
    expect(actorRoles(actor({ isMentor: true, roles: [[1, 'student'], [2, 'student']] })).sort()).toEqual(['mentor', 'student'])
  })
})
