import { converter, parse } from 'culori'
import { describe, expect, it } from 'vitest'
import { beamCaution, DEFAULT_KERF_MM, looksBlue } from '../../../../shared/films/library'
import { hsl } from '../../../../shared/utils/hsl'

describe('hsl', () => {
  it('agrees with culori (CSS Color 4 HSL) on named colours and random ones', () => {
    const toHsl = converter('hsl')
    const samples = ['#ff0000', '#00ff00', '#0000ff', '#1d3f8f', '#87ceeb', '#808080', '#f7f7f5', '#b3262e', '#008080']
    for (let i = 0; i < 200; i++) samples.push(`#${Math.floor(((i * 2654435761) >>> 0) % 0x1000000).toString(16).padStart(6, '0')}`)
    for (const hex of samples) {
      const ours = hsl(hex)!
      const ref = toHsl(parse(hex))!
      expect(ours.s, hex).toBeCloseTo(ref.s, 9)
      expect(ours.l, hex).toBeCloseTo(ref.l, 9)
      if (ref.s > 0 && ref.h !== undefined) expect(ours.h, hex).toBeCloseTo(ref.h, 9)
    }
    expect(hsl('blue')).toBeNull()
  })
})

describe('the blue-beam caution (common practice: a ~450 nm beam passes clear and blue films)', () => {
  const film = { opacity: 'opaque' as const, colourHex: '#1f1f1f', colour: 'matte black', tested: false }

  it('cautions an untested clear, translucent or blue film, and nothing else', () => {
    expect(beamCaution(film)).toBeNull()
    expect(beamCaution({ ...film, opacity: 'clear' })).toMatch(/clear film may let a blue diode laser's beam \(about 450 nm\) pass/)
    expect(beamCaution({ ...film, opacity: 'translucent' })).toMatch(/translucent film/)
    // Blue by its swatch (CSS named colours through culori) or by its name.
    for (const name of ['blue', 'navy', 'skyblue', 'lightblue', 'dodgerblue', 'royalblue', 'steelblue', 'cyan']) {
      expect(looksBlue(converter('rgb')(parse(name)) ? hexOf(name) : '', ''), name).toBe(true)
    }
    for (const name of ['red', 'black', 'white', 'orange', 'green', 'purple', 'gray', 'gold']) expect(looksBlue(hexOf(name), ''), name).toBe(false)
    expect(looksBlue('#808080', 'Pale sky blue')).toBe(true)
    expect(beamCaution({ ...film, colourHex: '#1d3f8f', colour: 'deep' })).toMatch(/blue film/)
    // Opaque white often cuts: colour alone does not caution it.
    expect(beamCaution({ ...film, colourHex: '#ffffff', colour: 'white' })).toBeNull()
  })

  it('goes once a test cut is recorded', () => {
    expect(beamCaution({ ...film, opacity: 'clear', tested: true })).toBeNull()
  })

  it('assumes a kerf inside the common-practice range for small diode lasers (0.1–0.3 mm)', () => {
    expect(DEFAULT_KERF_MM).toBeGreaterThanOrEqual(0.1)
    expect(DEFAULT_KERF_MM).toBeLessThanOrEqual(0.3)
  })
})

function hexOf(cssName: string): string {
  const c = converter('rgb')(parse(cssName))!
  const byte = (v: number) => Math.round(v * 255).toString(16).padStart(2, '0')
  return `#${byte(c.r)}${byte(c.g)}${byte(c.b)}`
}
