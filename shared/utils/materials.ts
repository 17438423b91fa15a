// The materials page, generated from the polymer register (shared/films/polymers.ts): one
// source of truth for what the laser may cut, the migration's seed, the films form and the API.
import { POLYMERS, UNKNOWN_POLYMER, type Polymer, type PolymerVerdict } from '../films/polymers'

export const VERDICT_LABELS: Record<PolymerVerdict, string> = {
  'allowed': 'Allowed',
  'ask-the-lab': 'Ask the lab',
  'never': 'Never laser',
}

export const VERDICT_HEADINGS: Record<PolymerVerdict, string> = {
  'allowed': 'May be cut',
  'ask-the-lab': 'Only with the lab\'s approval for the film',
  'never': 'Never under the laser',
}

export const VERDICT_ORDER: readonly PolymerVerdict[] = ['never', 'ask-the-lab', 'allowed']

export interface MaterialGroup { verdict: PolymerVerdict; heading: string; polymers: Polymer[] }

/** The register's entries by verdict, never first; "not known" is not a material. */
export function materialGroups(register: readonly Polymer[] = POLYMERS): MaterialGroup[] {
  return VERDICT_ORDER.map((verdict) => ({
    verdict, heading: VERDICT_HEADINGS[verdict],
    polymers: register.filter((p) => p.verdict === verdict && p.code !== UNKNOWN_POLYMER),
  }))
}

/** The blue-beam note under the table (common practice, from REFERENCES: about 445–455 nm). */
export const BLUE_BEAM_NOTE = 'Many lab diode lasers are blue, about 445–455 nm (common practice). Clear, translucent and blue films, and many white plastics, let that beam pass without absorbing it: they do not cut, and what lies underneath heats instead. Colour alone does not tell (opaque white film often cuts), so a film is cut on its test grid before decals are cut in it.'

/** Published sources behind the cautions shown on operator pages. */
export const SAFETY_SOURCES = [
  'US 21 CFR 1040.10: performance standards for laser products (classes, protective housing, interlocks)',
  'IEC 60825-1: safety of laser products, equipment classification and requirements',
  'ANSI Z136.1: safe use of lasers',
  'EN 207 and ANSI Z136.7: eyewear rated for the laser\'s wavelength',
]

/** "Contains chlorine and fluorine", for a register entry's halogens. */
export function halogenWords(halogens: readonly string[]): string {
  return halogens.length ? `Contains ${halogens.join(' and ')}` : 'No chlorine or fluorine'
}
