import { describe, expect, it } from 'vitest'
import {
  PRESET_PROFILES, copyProfile, lengthMm, presetProfile, ruleProfileSchema,
  type RuleProfile, type RuleSource,
} from '../../../../shared/plates/profiles'

const preset = (key: string): RuleProfile => {
  const p = presetProfile(key)
  if (!p) throw new Error(`no preset ${key}`)
  return p
}

/** Every { value, source } in a profile, with its path. */
function ruledValues(node: unknown, path = ''): Array<{ path: string; source: RuleSource }> {
  if (!node || typeof node !== 'object') return []
  if ('source' in node && 'value' in node) return [{ path, source: (node as { source: RuleSource }).source }]
  return Object.entries(node).flatMap(([k, v]) => ruledValues(v, path ? `${path}.${k}` : k))
}

describe('preset rule profiles', () => {
  it('are valid profiles with distinct keys', () => {
    expect(PRESET_PROFILES.map((p) => p.key)).toEqual(['frc-2023', 'ftc-2025-26', 'v5rc-2024-25'])
    for (const p of PRESET_PROFILES) expect(ruleProfileSchema.parse(p)).toEqual(p)
  })

  it('name the manual and rule beside every value, each marked as taken from the issue', () => {
    for (const p of PRESET_PROFILES) {
      const values = ruledValues(p)
      expect(values.length).toBeGreaterThanOrEqual(5)
      for (const { path, source } of values) {
        expect(source.manual, `${p.key} ${path}`).toBe(p.manual)
        expect(source.rule, `${p.key} ${path}`).toMatch(/^R\d+$/)
        // The manuals were not at hand: nothing may claim to have been read in them.
        expect(source.provenance, `${p.key} ${path}`).toBe('from this issue')
      }
      expect(p.notice).toMatch(/current manual decides/)
    }
  })

  // The figures as issue 13 quotes the manuals (FRC 2023 Game Manual R406; FTC 2025–26
  // Competition Manual R401–R403; V5RC 2024–25 Game Manual R10), each in inches, and the same
  // length worked by hand in millimetres with 1 in = 25.4 mm exactly (the international inch,
  // 1959 agreement; see REFERENCES.md).
  it.each([
    ['frc-2023', 'numerals.minHeight', 4, 101.6, 'R406'],
    ['frc-2023', 'numerals.minStroke', 0.5, 12.7, 'R406'],
    ['ftc-2025-26', 'numerals.minHeight', 2.25 - 0.5, 44.45, 'R403'],
    ['ftc-2025-26', 'numerals.maxHeight', 2.25 + 0.5, 69.85, 'R403'],
    ['ftc-2025-26', 'plate.minWidth', 6.5, 165.1, 'R402'],
    ['ftc-2025-26', 'plate.minHeight', 2.5, 63.5, 'R402'],
    ['ftc-2025-26', 'plate.margin', 0.25, 6.35, 'R403'],
    ['v5rc-2024-25', 'plate.minWidth', 4.48, 113.792, 'R10'],
    ['v5rc-2024-25', 'plate.minHeight', 2.48, 62.992, 'R10'],
  ] as const)('%s %s is %s in = %s mm (%s)', (key, path, inches, mm, rule) => {
    const [group, field] = path.split('.') as ['numerals' | 'plate', string]
    const ruled = (preset(key)[group] as Record<string, { value: { value: number; unit: string }; source: RuleSource } | null>)[field]
    expect(ruled).not.toBeNull()
    expect(ruled!.value).toEqual({ value: inches, unit: 'in' })
    expect(ruled!.source.rule).toBe(rule)
    expect(lengthMm(ruled!.value as { value: number; unit: 'in' })).toBeCloseTo(mm, 9)
  })

  it('state the colours, sides and alliance rules the issue quotes', () => {
    const frc = preset('frc-2023'), ftc = preset('ftc-2025-26'), vex = preset('v5rc-2024-25')
    expect(frc.numerals.colours?.value).toEqual(['white'])
    expect(frc.plate.backgrounds).toBeNull()
    expect(frc.sides.value).toEqual({ kind: 'every-side' })
    expect(ftc.numerals.colours?.value).toEqual(['white'])
    expect(ftc.plate.backgrounds?.value).toEqual(['red', 'blue'])
    expect(ftc.sides.value).toEqual({ kind: 'apart-90', count: 2 })
    expect(ftc.sides.source.rule).toBe('R401')
    expect(ftc.allianceColours).toBeNull()
    expect(vex.numerals.colours?.value).toEqual(['white'])
    expect(vex.sides.value).toEqual({ kind: 'opposite' })
    expect(vex.allianceColours?.value).toEqual(['red', 'blue'])
  })
})

describe('lengthMm', () => {
  it('converts inches by the international inch and leaves millimetres alone', () => {
    // 1 in = 25.4 mm exactly (1959 agreement)
    expect(lengthMm({ value: 1, unit: 'in' })).toBe(25.4)
    expect(lengthMm({ value: 10, unit: 'in' })).toBeCloseTo(254, 12)
    expect(lengthMm({ value: 42.5, unit: 'mm' })).toBe(42.5)
  })
})

describe('ruleProfileSchema', () => {
  it('refuses a height range upside down and a plate given short side first', () => {
    const ftc = preset('ftc-2025-26')
    const upside = structuredClone(ftc)
    upside.numerals.maxHeight!.value = { value: 40, unit: 'mm' }
    const r1 = ruleProfileSchema.safeParse(upside)
    expect(r1.success).toBe(false)
    expect(r1.error?.issues[0]?.path).toEqual(['numerals', 'maxHeight'])
    const turned = structuredClone(ftc)
    turned.plate.minWidth!.value = { value: 2, unit: 'in' }
    expect(ruleProfileSchema.safeParse(turned).success).toBe(false)
  })

  it('refuses an unknown colour, side rule or provenance', () => {
    const vex = preset('v5rc-2024-25')
    const ok = (p: unknown) => ruleProfileSchema.safeParse(p).success
    expect(ok(vex)).toBe(true)
    expect(ok({ ...vex, numerals: { ...vex.numerals, colours: { ...vex.numerals.colours, value: ['chartreuse'] } } })).toBe(false)
    expect(ok({ ...vex, sides: { ...vex.sides, value: { kind: 'diagonal' } } })).toBe(false)
    expect(ok({ ...vex, sides: { ...vex.sides, value: { kind: 'apart-90', count: 1 } } })).toBe(false)
    expect(ok({ ...vex, sides: { ...vex.sides, source: { ...vex.sides.source, provenance: 'guessed' } } })).toBe(false)
    expect(ok({ ...vex, allianceColours: { ...vex.allianceColours, value: ['red'] } })).toBe(false)
  })

  it('copies a preset under a new key, keeping every value and its source', () => {
    const copy = copyProfile(preset('ftc-2025-26'), 'our-league-ftc')
    expect(copy.key).toBe('our-league-ftc')
    expect({ ...copy, key: 'ftc-2025-26' }).toEqual(preset('ftc-2025-26'))
    copy.numerals.minHeight!.value.value = 3
    expect(preset('ftc-2025-26').numerals.minHeight!.value.value).toBe(1.75)
  })
})
