import { describe, expect, it } from 'vitest'
import { invitationSchema, signInSchema, teamSchema, PASSWORD_MIN, acceptInvitationSchema } from '../../../shared/utils/schemas'

describe('request schemas', () => {
  it('normalises e-mail addresses for sign-in', () => {
    expect(signInSchema.parse({ email: '  Ada@Example.ORG ', password: 'x' }).email).toBe('ada@example.org')
  })

  it('needs a team for every role but mentor', () => {
    expect(invitationSchema.safeParse({ email: 'a@b.example', name: 'A', role: 'student' }).success).toBe(false)
    expect(invitationSchema.safeParse({ email: 'a@b.example', name: 'A', role: 'mentor' }).success).toBe(true)
    expect(invitationSchema.safeParse({ email: 'a@b.example', name: 'A', role: 'student', teamId: 3 }).success).toBe(true)
    expect(invitationSchema.safeParse({ email: 'nope', name: 'A', role: 'mentor' }).success).toBe(false)
  })

  it('asks for passwords of a minimum length', () => {
    expect(acceptInvitationSchema.safeParse({ password: 'x'.repeat(PASSWORD_MIN - 1) }).success).toBe(false)
    expect(acceptInvitationSchema.safeParse({ password: 'x'.repeat(PASSWORD_MIN) }).success).toBe(true)
  })

  it('takes a team colour as #rrggbb and an empty number as none', () => {
    expect(teamSchema.parse({ name: 'T', number: '', colour: '#aabbcc' }).number).toBeNull()
    expect(teamSchema.safeParse({ name: 'T', colour: 'teal' }).success).toBe(false)
  })
})
