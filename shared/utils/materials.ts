// What a school lab's laser may and may not cut, with the reason and where the reason comes
// from. "Common practice" marks a rule labs follow that we did not read in a published source;
// "from memory" marks a fact remembered rather than read. The lab's own rules come first.

export type Verdict = 'allowed' | 'not-allowed' | 'ask'

export interface Material {
  name: string
  alsoCalled: string
  verdict: Verdict
  why: string
  source: string
}

export const MATERIALS: Material[] = [
  {
    name: 'PVC', alsoCalled: 'vinyl, sign vinyl, many cheap adhesive films, "Sintra" foam board',
    verdict: 'not-allowed',
    why: 'Heated PVC gives off hydrogen chloride (it dehydrochlorinates): a corrosive gas that harms eyes and lungs and rusts the laser\'s optics and rails. Decalwright refuses any film that is not chlorine-free.',
    source: 'Thermal dehydrochlorination of PVC: polymer chemistry (from memory); banning PVC: common practice in laser labs',
  },
  {
    name: 'Other chlorinated plastics', alsoCalled: 'PVDC, chloroprene (neoprene), chlorinated rubber',
    verdict: 'not-allowed', why: 'Like PVC, they release chlorine compounds when burnt.', source: 'Common practice',
  },
  {
    name: 'ABS', alsoCalled: 'many 3D-printing filaments, toy bricks, electronics housings',
    verdict: 'not-allowed', why: 'Melts and burns rather than cutting cleanly, and its fumes include styrene and, when burning, hydrogen cyanide.',
    source: 'Common practice; the fume composition from memory',
  },
  {
    name: 'Polycarbonate', alsoCalled: 'PC, "Lexan"-type sheet, robot shields',
    verdict: 'not-allowed', why: 'Chars and catches fire instead of cutting, with heavy smoke. Cut polycarbonate shields with a saw or router, not the laser.',
    source: 'Common practice',
  },
  {
    name: 'Acetal', alsoCalled: 'POM, polyoxymethylene',
    verdict: 'ask', why: 'It cuts, but its fumes contain formaldehyde. Many labs forbid it; some allow it only with strong extraction.',
    source: 'Formaldehyde from heated POM: from memory; the restriction: common practice',
  },
  {
    name: 'Acrylic', alsoCalled: 'PMMA, "plexiglass"',
    verdict: 'ask',
    why: 'A CO₂ laser cuts it well. A blue diode laser (about 450 nm) passes straight through clear and white acrylic without cutting it, and may heat what lies underneath; only dark, opaque acrylic absorbs the blue beam.',
    source: 'Blue diode lasers and clear plastics: common practice (about 445–455 nm); absorption of PMMA: from memory',
  },
  {
    name: 'Clear or white plastic films', alsoCalled: 'clear PET, white polyolefin',
    verdict: 'ask', why: 'Chlorine-free films may be cut, but clear and white ones hardly absorb a blue diode laser\'s light, so they do not cut. Dark, coloured films do.',
    source: 'Common practice',
  },
  {
    name: 'Chlorine-free adhesive film', alsoCalled: 'polyester (PET) or polyolefin decal film with acrylic adhesive',
    verdict: 'allowed', why: 'The usual decal film for the lab laser once its safety data sheet confirms it is chlorine-free. Record it in the film stock with the lab\'s tested laser settings.',
    source: 'Common practice; check the film\'s safety data sheet',
  },
  {
    name: 'Wood and veneer', alsoCalled: 'birch veneer, thin plywood, MDF',
    verdict: 'allowed', why: 'Cuts and engraves well. It burns: watch the job the whole time. Plywood glue and MDF binders add fumes; use the lab\'s extraction.',
    source: 'Common practice',
  },
  {
    name: 'Paper and card', alsoCalled: 'label stock, cardboard',
    verdict: 'allowed', why: 'Cuts easily and also catches fire easily: low power, several passes, never unattended.', source: 'Common practice',
  },
  {
    name: 'Fibreglass and carbon fibre', alsoCalled: 'FR4 circuit board, G10, carbon plate',
    verdict: 'not-allowed', why: 'The resin gives off toxic fumes and the fibres do not cut; fine fibre dust is a breathing hazard.', source: 'Common practice',
  },
]

export const VERDICT_LABELS: Record<Verdict, string> = {
  'allowed': 'Allowed',
  'not-allowed': 'Never laser',
  'ask': 'Ask your lab',
}

/** Published sources behind the cautions shown on operator pages. */
export const SAFETY_SOURCES = [
  'US 21 CFR 1040.10: performance standards for laser products (classes, protective housing, interlocks)',
  'IEC 60825-1: safety of laser products, equipment classification and requirements',
  'ANSI Z136.1: safe use of lasers',
  'EN 207 and ANSI Z136.7: eyewear rated for the laser\'s wavelength',
]
