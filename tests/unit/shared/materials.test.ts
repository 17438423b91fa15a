import { describe, expect, it } from 'vitest'
import { POLYMERS, UNKNOWN_POLYMER } from '../../../shared/films/polymers'
import { halogenWords, materialGroups } from '../../../shared/utils/materials'

describe('the materials page, generated from the register', () => {
  it('lists every register entry once under its own verdict, never first, and not "not known"', () => {
    const groups = materialGroups()
    expect(groups.map((g) => g.verdict)).toEqual(['never', 'ask-the-lab', 'allowed'])
    const listed = groups.flatMap((g) => g.polymers.map((p) => p.code))
    expect(listed.sort()).toEqual(POLYMERS.filter((p) => p.code !== UNKNOWN_POLYMER).map((p) => p.code).sort())
    for (const g of groups) for (const p of g.polymers) expect(p.verdict).toBe(g.verdict)
    expect(groups[0]!.polymers.map((p) => p.code)).toEqual(expect.arrayContaining(['PVC', 'PVDC', 'CPVC', 'CPE', 'CSM', 'CR', 'PTFE', 'PVF', 'PVDF', 'ABS']))
    expect(halogenWords(['chlorine'])).toBe('Contains chlorine')
  })

  it('follows a change to the register: an entry added there appears here', () => {
    const extra = { ...POLYMERS[0]!, code: 'NEW', verdict: 'ask-the-lab' as const }
    expect(materialGroups([...POLYMERS, extra])[1]!.polymers.map((p) => p.code)).toContain('NEW')
  })
})
