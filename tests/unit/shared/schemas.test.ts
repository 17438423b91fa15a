import { describe, expect, it } from 'vitest'
import { z } from 'zod'
import { artworkFieldsSchema, artworkListQuerySchema, cutSheetQuerySchema, formNumber, invitationSchema, signInSchema, teamSchema, PASSWORD_MIN, acceptInvitationSchema } from '../../../shared/utils/schemas'

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

describe('numbers typed into forms and query strings', () => {
  const n = formNumber(z.number().optional())

  it('reads plain decimals only', () => {
    for (const [text, value] of [['12', 12], [' 12 ', 12], ['12.5', 12.5], ['-3', -3], ['.5', 0.5], ['0', 0]] as const) {
      expect(n.parse(text), text).toBe(value)
    }
  })

  it('refuses what Number() would read as something else', () => {
    // Number('0x10') is 16, Number('1e2') 100, Number(' ') 0, Number('0b11') 3, Number('Infinity') Infinity.
    for (const text of ['0x10', '1e2', ' ', '12abc', '0b11', '0o7', 'Infinity', 'NaN', '+5', '1,5', '--1']) {
      expect(n.safeParse(text).success, text).toBe(false)
    }
  })

  it('leaves a missing or empty field to its default', () => {
    expect(n.parse(undefined)).toBeUndefined()
    expect(n.parse('')).toBeUndefined()
    expect(artworkFieldsSchema.parse({ title: 'T', teamId: '3', widthMm: '' }).widthMm).toBe(150)
  })

  it('is used by the upload form, the list pages and the cut sheet', () => {
    const upload = artworkFieldsSchema.safeParse({ title: 'T', teamId: '3', widthMm: '0x10' })
    expect(upload.success).toBe(false)
    expect(z.flattenError(upload.error!).fieldErrors.widthMm).toBeTruthy()
    expect(artworkFieldsSchema.safeParse({ title: 'T', teamId: '0x3', widthMm: '40' }).success).toBe(false)
    expect(artworkListQuerySchema.safeParse({ limit: '1e1' }).success).toBe(false)
    expect(artworkListQuerySchema.parse({ limit: '10' }).limit).toBe(10)
    expect(cutSheetQuerySchema.safeParse({ gap: '0x2' }).success).toBe(false)
    expect(cutSheetQuerySchema.parse({ gap: '2.5' }).gap).toBe(2.5)
  })
})
