import { describe, expect, it } from 'vitest'
import { normaliseTeamNumber, teamNumberSchema } from '../../../../shared/plates/team-number'

describe('team numbers', () => {
  it('takes digits and one letter after them, trimmed and upper-cased', () => {
    expect(normaliseTeamNumber('7')).toBe('7')
    expect(normaliseTeamNumber(' 90210 ')).toBe('90210')
    expect(normaliseTeamNumber('4321b')).toBe('4321B')
    expect(normaliseTeamNumber('123456')).toBe('123456')
  })

  it('refuses anything else with a sentence', () => {
    for (const bad of ['', 'B', '12 34', '12-34', '1234BC', '1234567', 'A123', '١٢٣']) {
      const r = teamNumberSchema.safeParse(bad)
      expect(r.success, bad).toBe(false)
      expect(r.error?.issues[0]?.message).toMatch(/^Enter the team number/)
    }
  })
})
