import { describe, expect, it } from 'vitest'
import { copyProfile, presetProfile } from '../../../../shared/plates/profiles'
import { markChanged } from '../../../../shared/plates/provenance'

describe('provenance of edited profile values', () => {
  const before = copyProfile(presetProfile('ftc-2025-26')!, 'p1-test')

  it('marks a changed value as the program\'s own, keeps its rule and drops the manual\'s wording', () => {
    const after = structuredClone(before)
    after.plate.margin!.value = { value: 8, unit: 'mm' }
    const out = markChanged(before, after)
    expect(out.plate.margin).toEqual({ value: { value: 8, unit: 'mm' }, source: { manual: before.manual, rule: 'R403', provenance: 'set by the program' } })
    expect(out.plate.minWidth).toEqual(before.plate.minWidth)
  })

  it('leaves a value whose keys come back in another order as it was', () => {
    const after = structuredClone(before)
    // As the database's JSON returns it: keys by length, then alphabetically.
    after.numerals.minHeight!.value = { unit: 'in', value: 1.75 } as never
    expect(markChanged(before, after).numerals.minHeight!.source.provenance).toBe('from this issue')
  })

  it('marks a new rule, a changed side rule and changed colours; removing a rule leaves nothing to mark', () => {
    const after = structuredClone(before)
    after.numerals.minStroke = { value: { value: 5, unit: 'mm' }, source: { manual: before.manual, rule: 'R403', provenance: 'from this issue' } }
    after.sides.value = { kind: 'opposite' }
    after.plate.backgrounds!.value = ['blue']
    after.numerals.maxHeight = null
    const out = markChanged(before, after)
    expect([out.numerals.minStroke!.source.provenance, out.sides.source.provenance, out.plate.backgrounds!.source.provenance])
      .toEqual(['set by the program', 'set by the program', 'set by the program'])
    expect(out.numerals.maxHeight).toBeNull()
    expect(out.numerals.colours!.source.provenance).toBe('from this issue')
  })
})
