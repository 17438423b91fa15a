// Colour in a perceptual space: 8-bit sRGB → CIELAB under D65 (IEC 61966-2-1 for the sRGB
// transfer function and primaries, CIE 15 for CIELAB), colour difference by CIEDE2000, and
// plain colour words for the sentences the upload shows. The arithmetic is culori's (pinned in
// package.json); this module only fixes which of its modes we use: 'lab65' (D65 white), not
// its default 'lab' (D50).
import { converter, differenceCiede2000, formatHex } from 'culori'

export interface Lab {
  /** Lightness L*, 0 (black) … 100 (white). */
  l: number
  a: number
  b: number
}

const toLab65 = converter('lab65')
const toLch65 = converter('lch65')
const toRgb = converter('rgb')
const ciede2000 = differenceCiede2000()

/** CIELAB (D65) of an 8-bit sRGB colour. */
export function srgbToLab(r: number, g: number, b: number): Lab {
  const c = toLab65({ mode: 'rgb', r: r / 255, g: g / 255, b: b / 255 })
  return { l: c.l, a: c.a, b: c.b }
}

/** CIEDE2000 colour difference ΔE00 (kL = kC = kH = 1). */
export function deltaE00(x: Lab, y: Lab): number {
  return ciede2000({ mode: 'lab65', l: x.l, a: x.a, b: x.b }, { mode: 'lab65', l: y.l, a: y.a, b: y.b })
}

/** The sRGB colour of a CIELAB (D65) colour as #rrggbb, clipped into the sRGB gamut. */
export function labToHex(c: Lab): string {
  const rgb = toRgb({ mode: 'lab65', l: c.l, a: c.a, b: c.b })
  const clip = (v: number) => Math.min(1, Math.max(0, v))
  return formatHex({ mode: 'rgb', r: clip(rgb.r), g: clip(rgb.g), b: clip(rgb.b) })
}

/** The sRGB colour of a CIELAB (D65) colour in 8-bit units, not clipped (for mixing arithmetic). */
export function labToSrgb255(c: Lab): [number, number, number] {
  const rgb = toRgb({ mode: 'lab65', l: c.l, a: c.a, b: c.b })
  return [rgb.r * 255, rgb.g * 255, rgb.b * 255]
}

/** Lightness, chroma and hue angle (degrees, 0–360; 0 for a neutral) of a CIELAB colour. */
export function lch(c: Lab): { l: number, c: number, h: number } {
  const x = toLch65({ mode: 'lab65', l: c.l, a: c.a, b: c.b })
  return { l: x.l, c: x.c, h: x.h ?? 0 }
}

/** White paper, evened: L* 100. */
export const WHITE: Lab = Object.freeze({ l: 100, a: 0, b: 0 })

/** Below this chroma a colour reads as a grey (common practice for plain names; our own bands). */
const NEUTRAL_CHROMA = 12

/**
 * A plain English word for an ink colour, from its lightness, chroma and hue angle in CIELAB.
 * The hue bands are our own, placed so the sRGB primaries and secondaries and the common
 * marker colours read as a person would name them (checked in lab.test.ts).
 */
export function colourName(c: Lab): string {
  const { l, c: chroma, h } = lch(c)
  if (chroma < NEUTRAL_CHROMA) {
    if (l < 30) return 'black'
    if (l < 50) return 'dark grey'
    if (l < 78) return 'grey'
    if (l < 92) return 'light grey'
    return 'white'
  }
  if (h < 15 || h >= 340) return l > 50 ? 'pink' : 'red'
  if (h < 47) return l > 72 ? 'pink' : 'red'
  if (h < 75) return l < 50 ? 'brown' : 'orange'
  if (h < 110) return l >= 70 ? 'yellow' : h < 90 ? 'brown' : 'olive'
  if (h < 190) return l > 75 ? 'light green' : 'green'
  if (h < 235) return 'teal'
  if (h < 315) return l > 70 ? 'light blue' : 'blue'
  return l < 50 ? 'purple' : 'pink'
}

/**
 * The paper's tint in a word, or null when it reads as plain white: its hue, when its chroma is
 * at least 4 (a cream or bluish sheet), or grey when it is dull.
 */
export function paperTint(c: Lab): string | null {
  const { l, c: chroma, h } = lch(c)
  if (chroma < 4) return l < 80 ? 'grey' : null
  if (h >= 60 && h < 120) return 'cream'
  if (h >= 120 && h < 200) return 'greenish'
  if (h >= 200 && h < 300) return 'bluish'
  return 'pinkish'
}
