import { describe, expect, it } from 'vitest'
import { matchPolymer, polymerByCode, polymerClears, POLYMERS, searchPolymers, UNKNOWN_POLYMER } from '../../../../shared/films/polymers'
import { spellings } from '../../../support/spellings'

describe('the polymer register', () => {
  it('has the entries a lab needs, each with a verdict, a reason and a source', () => {
    for (const code of ['PET', 'PP', 'PE', 'PC', 'PMMA', 'PI', 'PAPER', 'PU', 'PVC', 'PVDC', 'CPVC', 'CPE', 'CSM', 'CR', 'PTFE', 'PVF', 'PVDF', 'ABS', UNKNOWN_POLYMER]) {
      const p = polymerByCode(code)
      expect(p, code).toBeTruthy()
      expect(p!.why.length, code).toBeGreaterThan(20)
      expect(p!.sources.length, code).toBeGreaterThan(0)
    }
    expect(new Set(POLYMERS.map((p) => p.code)).size).toBe(POLYMERS.length)
  })

  it('never clears a polymer that carries chlorine or fluorine, whatever the lab says', () => {
    for (const p of POLYMERS.filter((x) => x.halogens.length)) {
      expect(p.verdict, p.code).toBe('never')
      expect(polymerClears(p, true), p.code).toBe(false)
    }
    // The list: polyurethane gives off hydrogen cyanide — ask the lab; ABS never.
    expect(polymerByCode('PU')!.verdict).toBe('ask-the-lab')
    expect(polymerByCode('ABS')!.verdict).toBe('never')
    expect(polymerClears(polymerByCode('PU')!, false)).toBe(false)
    expect(polymerClears(polymerByCode('PU')!, true)).toBe(true)
    expect(polymerClears(polymerByCode(UNKNOWN_POLYMER)!, true)).toBe(false)
  })

  it('recognises every chlorine- and fluorine-bearing name and synonym in several spellings', () => {
    for (const p of POLYMERS.filter((x) => x.halogens.length)) {
      for (const name of p.names) {
        for (const typed of spellings(name)) {
          const m = matchPolymer(typed)
          expect(m?.code, `"${typed}" (${p.code})`).toBe(p.code)
        }
      }
    }
  })

  it('reads what was typed before the register: the face film first, a halogen anywhere wins', () => {
    const cases: [string, string | null][] = [
      ['Polyester (PET) with acrylic adhesive', 'PET'],
      ['Wood veneer on paper backing', 'WOOD'],
      ['Cast vinyl white', 'PVC'],
      ['Glossy white sign vinyl', 'PVC'],
      ['polyvinylchloride', 'PVC'],
      ['PVC-free vinyl', 'PU'],
      ['pvc free vinyl, matte', 'PU'],
      ['Non-PVC vinyl', 'PU'],
      ['Chlorosulfonated polyethylene', 'CSM'],
      ['chlorinated polyethylene sheet', 'CPE'],
      ['Acrylic film on a PVC liner', 'PVC'],
      ['Polyethylene terephthalate', 'PET'],
      ['Kraft paper', 'PAPER'],
      ['Polypropylene', 'PP'],
      ['Mystery offcut', null],
      ['', null],
      // Short codes only as whole words: "paper" is not "PE", "price" not "PC".
      ['paper price list', 'PAPER'],
    ]
    for (const [typed, code] of cases) expect(matchPolymer(typed)?.code ?? null, typed).toBe(code)
  })

  it('searches by any common name as the mentor types', () => {
    expect(searchPolymers('vin').map((p) => p.code)).toContain('PVC')
    expect(searchPolymers('polyest')[0]!.code).toBe('PET')
    expect(searchPolymers('PET')[0]!.code).toBe('PET')
    expect(searchPolymers('teflon')).toEqual([])
    expect(searchPolymers('').length).toBe(POLYMERS.length - 1)
  })
})
