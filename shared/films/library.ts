// The film library's own rules, shared by the server and the pages: what a film's opacity,
// kerf and colour mean at the laser, and when a film gets the blue-beam caution.
import { hsl } from '../utils/hsl'

export const OPACITIES = ['opaque', 'translucent', 'clear'] as const
export type Opacity = (typeof OPACITIES)[number]
export const OPACITY_LABELS: Record<Opacity, string> = { opaque: 'Opaque', translucent: 'Translucent', clear: 'Clear' }

/**
 * The kerf assumed until the lab measures its own on a test cut. Common practice: a small
 * diode laser cuts a line about 0.1–0.3 mm wide in thin film; 0.15 mm is a middle value.
 */
export const DEFAULT_KERF_MM = 0.15
export const DEFAULT_KERF_SOURCE = 'common practice: a small diode laser cuts about 0.1–0.3 mm wide; measure your own on a test cut'

/**
 * Whether a film looks blue: its swatch's hue lies between cyan and violet (180°–260°) with
 * some colour in it, or its colour's name says blue. A blue film reflects and passes blue
 * light, so a ~450 nm beam may not cut it (common practice).
 */
export function looksBlue(hex: string, name = ''): boolean {
  if (/\b(blue|cyan|azure|navy|cobalt|sky|turquoise|teal)\b/i.test(name)) return true
  const c = hsl(hex)
  return !!c && c.h >= 180 && c.h <= 260 && c.s >= 0.2 && c.l >= 0.08 && c.l <= 0.95
}

export interface BeamFacts {
  opacity: Opacity
  colourHex: string
  colour: string
  /** Whether a test cut has been recorded for this film on this program's laser. */
  tested: boolean
}

/**
 * The caution shown on the placement form and the job page until a test cut is recorded:
 * clear, translucent and blue films may pass a blue diode laser's ~450 nm beam without
 * absorbing it (common practice), and colour alone does not tell (opaque white often cuts).
 */
export function beamCaution(f: BeamFacts): string | null {
  if (f.tested) return null
  const why = f.opacity === 'clear' ? 'clear' : f.opacity === 'translucent' ? 'translucent' : looksBlue(f.colourHex, f.colour) ? 'blue' : null
  if (!why) return null
  return `Not tested on this laser yet, and ${why} film may let a blue diode laser's beam (about 450 nm) pass without cutting, heating what lies underneath instead (common practice). Cut the film's test grid and record the result before cutting decals.`
}
