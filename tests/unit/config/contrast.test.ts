// Every text colour of the theme against every surface it is set on reaches the contrast
// WCAG 2.2 asks of body text at level AA (success criterion 1.4.3: at least 4.5 : 1).
import { describe, expect, it } from 'vitest'
import { wcagContrast } from 'culori'
import config from '../../../tailwind.config'

const colours = config.theme.extend.colors

// Relative luminance and contrast ratio as WCAG 2.x defines them (W3C, Web Content
// Accessibility Guidelines 2.2, "relative luminance" and "contrast ratio" in its glossary:
// sRGB channels linearised with 0.04045 / 12.92 / ((c + 0.055) / 1.055) ^ 2.4, then
// L = 0.2126 R + 0.7152 G + 0.0722 B, ratio = (L1 + 0.05) / (L2 + 0.05)).
function channel(byte: number): number {
  const c = byte / 255
  return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4
}
function luminance(hex: string): number {
  const n = Number.parseInt(hex.slice(1), 16)
  return 0.2126 * channel(n >> 16) + 0.7152 * channel((n >> 8) & 255) + 0.0722 * channel(n & 255)
}
export function contrastRatio(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x) as [number, number]
  return (hi + 0.05) / (lo + 0.05)
}

// Colours the pages set text in, and the surfaces under it (cards are white, the page is
// paper, table heads and quiet hovers paper.deep, notices their own tinted grounds).
const TEXT = {
  'ink': colours.ink.DEFAULT, 'ink.soft': colours.ink.soft, 'ink.faint': colours.ink.faint,
  'accent': colours.accent.DEFAULT, 'accent.dark': colours.accent.dark,
  'caution': colours.caution.DEFAULT, 'danger': colours.danger.DEFAULT, 'ok': colours.ok.DEFAULT,
}
const SURFACES = {
  'white': '#ffffff', 'paper': colours.paper.DEFAULT, 'paper.deep': colours.paper.deep,
  'accent.light': colours.accent.light, 'caution.bg': colours.caution.bg, 'danger.bg': colours.danger.bg, 'ok.bg': colours.ok.bg,
}

describe('text contrast of the theme', () => {
  it('computes the ratio as the standard does: black on white is 21 : 1, a colour on itself 1 : 1', () => {
    expect(contrastRatio('#000000', '#ffffff')).toBeCloseTo(21, 6)
    expect(contrastRatio('#8a857b', '#8a857b')).toBe(1)
    // A second opinion on the formula: culori's WCAG contrast, a general colour library.
    expect(contrastRatio('#8a857b', '#f6f4ef')).toBeCloseTo(wcagContrast('#8a857b', '#f6f4ef'), 6)
    // The faint grey this theme had before is one the check must refuse (3.34 : 1 on paper).
    expect(contrastRatio('#8a857b', '#f6f4ef')).toBeLessThan(4.5)
  })

  for (const [textName, text] of Object.entries(TEXT)) {
    it(`${textName} text reads at 4.5 : 1 or more on every surface`, () => {
      const low = Object.entries(SURFACES)
        .map(([surface, ground]) => ({ surface, ratio: Math.round(contrastRatio(text, ground) * 100) / 100 }))
        .filter((r) => r.ratio < 4.5)
      expect(low).toEqual([])
      for (const ground of Object.values(SURFACES)) expect(contrastRatio(text, ground)).toBeCloseTo(wcagContrast(text, ground), 6)
    })
  }
})
