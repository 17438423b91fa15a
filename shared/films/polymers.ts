// The register of base polymers a film can be made of. It is reference data: a migration
// copies it into the database (where the chlorine rule is enforced), and the films form, the
// materials page and the checks all read this one list. A film chooses an entry; whether it
// is chlorine-free and whether the laser may cut it follow from the entry, never from what
// someone typed.
//
// The verdict is about cutting thin adhesive film on a small enclosed laser with the lab's
// extraction running. Every verdict defers to the lab's rules, local codes, the machine's
// manual and the material's safety data sheet.

export type Halogen = 'chlorine' | 'fluorine'

/** allowed: may be placed and cut; ask-the-lab: only after a mentor records the lab's approval for that film; never. */
export type PolymerVerdict = 'allowed' | 'ask-the-lab' | 'never'

export interface PolymerSource {
  kind: 'guidance' | 'common-practice'
  /** Who published it and what, in words a mentor can look up. */
  title: string
  url?: string
}

export interface Polymer {
  code: string
  name: string
  /** Common names, trade words and spellings a mentor may type; matched whole, ignoring case, spaces and hyphens. */
  names: string[]
  halogens: Halogen[]
  verdict: PolymerVerdict
  /** One sentence: why this verdict. */
  why: string
  sources: PolymerSource[]
}

// A published laboratory guidance page that lists materials a laser may not cut and the gases
// they give off; cited beside the entries it covers.
const LAB_GUIDANCE: PolymerSource = {
  kind: 'guidance',
  title: 'University of Texas at Austin, School of Architecture digital fabrication wiki: "Prohibited Laser Cutter Materials"',
  url: 'https://wikis.utexas.edu/display/SOAdigitech/Prohibited+Laser+Cutter+Materials',
}
const COMMON: PolymerSource = { kind: 'common-practice', title: 'Common practice in school and club laser labs' }
const CHEMISTRY: PolymerSource = {
  kind: 'common-practice',
  title: 'Polymer chemistry, common practice: chlorinated polymers release hydrogen chloride when heated (thermal dehydrochlorination); fluoropolymers release hydrogen fluoride and other fluorine compounds',
}

const HCl = 'Contains chlorine: gives off hydrogen chloride when lasered, which harms people and corrodes the machine. It can never be placed or cut.'
const HF = 'Contains fluorine: gives off hydrogen fluoride and other toxic fluorine compounds when lasered. It can never be placed or cut.'

export const UNKNOWN_POLYMER = 'UNKNOWN'

export const POLYMERS: readonly Polymer[] = [
  {
    code: 'PET', name: 'Polyester (PET)',
    names: ['polyester', 'PET', 'PETE', 'BoPET', 'polyethylene terephthalate', 'poly(ethylene terephthalate)', 'polyester film'],
    halogens: [], verdict: 'allowed',
    why: 'Thin polyester film cuts cleanly; like every plastic it needs the lab\'s extraction running.',
    sources: [COMMON],
  },
  {
    code: 'PP', name: 'Polypropylene',
    names: ['polypropylene', 'PP', 'BOPP', 'polypropylene film'],
    halogens: [], verdict: 'allowed',
    why: 'Thin polypropylene film cuts with a little melting at the edge; foam sheets are a fire risk and are not film.',
    sources: [COMMON],
  },
  {
    code: 'PE', name: 'Polyethylene',
    names: ['polyethylene', 'polythene', 'PE', 'LDPE', 'HDPE', 'LLDPE'],
    halogens: [], verdict: 'ask-the-lab',
    why: 'Melts and catches fire easily, and many labs do not allow it: only with the lab\'s approval for this film.',
    sources: [LAB_GUIDANCE],
  },
  {
    code: 'PC', name: 'Polycarbonate',
    names: ['polycarbonate', 'PC'],
    halogens: [], verdict: 'ask-the-lab',
    why: 'Chars, discolours and can catch fire instead of cutting, and many labs do not allow it: only with the lab\'s approval for this film.',
    sources: [LAB_GUIDANCE],
  },
  {
    code: 'PMMA', name: 'Acrylic (PMMA)',
    names: ['acrylic', 'PMMA', 'polymethyl methacrylate', 'poly(methyl methacrylate)', 'acrylic glass', 'cast acrylic', 'extruded acrylic', 'acrylic film'],
    halogens: [], verdict: 'allowed',
    why: 'The usual laser plastic: it vaporises cleanly. Clear acrylic lets a blue diode beam pass without cutting.',
    sources: [COMMON],
  },
  {
    code: 'PI', name: 'Polyimide',
    names: ['polyimide', 'PI', 'polyimide film', 'polyimide tape'],
    halogens: [], verdict: 'allowed',
    why: 'Heat-resistant film that cuts cleanly with extraction running.',
    sources: [COMMON],
  },
  {
    code: 'PAPER', name: 'Paper',
    names: ['paper', 'sticker paper', 'label paper', 'paper sticker', 'cardstock', 'card stock'],
    halogens: [], verdict: 'allowed',
    why: 'Cuts easily; watch for flame on long, slow paths.',
    sources: [COMMON],
  },
  {
    code: 'WOOD', name: 'Wood veneer',
    names: ['wood veneer', 'veneer', 'wood', 'birch veneer', 'wood sticker'],
    halogens: [], verdict: 'allowed',
    why: 'Thin veneer cuts and engraves well; it chars at the edge and can flare on slow passes.',
    sources: [COMMON],
  },
  {
    code: 'PU', name: 'Polyurethane',
    names: ['polyurethane', 'PU', 'TPU', 'thermoplastic polyurethane', 'polyurethane film', 'PVC-free vinyl', 'non-PVC vinyl', 'chlorine-free vinyl'],
    halogens: [], verdict: 'ask-the-lab',
    why: 'Gives off hydrogen cyanide when burnt: only with the lab\'s approval for this film, judged on its safety data sheet.',
    sources: [LAB_GUIDANCE],
  },
  {
    code: 'POM', name: 'Acetal (POM)',
    names: ['acetal', 'POM', 'polyoxymethylene', 'polyacetal', 'acetal copolymer'],
    halogens: [], verdict: 'ask-the-lab',
    why: 'It cuts, but its fumes carry formaldehyde; many labs forbid it and others allow it only with strong extraction: only with the lab\'s approval for this film.',
    sources: [COMMON],
  },
  {
    code: 'FRP', name: 'Fibreglass and carbon fibre in resin',
    names: ['fibreglass', 'fiberglass', 'glass fibre', 'glass fiber', 'GRP', 'FR4', 'FR-4', 'G10', 'carbon fibre', 'carbon fiber', 'carbon fibre plate', 'CFRP'],
    halogens: [], verdict: 'never',
    why: 'The resin gives off toxic fumes (circuit board often carries a brominated flame retardant), the fibres do not cut, and the fine dust is a breathing hazard.',
    sources: [COMMON],
  },
  {
    code: 'ABS', name: 'ABS (acrylonitrile butadiene styrene)',
    names: ['ABS', 'acrylonitrile butadiene styrene'],
    halogens: [], verdict: 'never',
    why: 'Melts and flares instead of cutting and gives off hydrogen cyanide; the lab\'s own rule of thumb is never.',
    sources: [LAB_GUIDANCE, COMMON],
  },
  {
    code: 'PVC', name: 'PVC (polyvinyl chloride)',
    names: ['PVC', 'vinyl', 'polyvinyl chloride', 'poly(vinyl chloride)', 'polyvinylchloride', 'uPVC', 'PVC-U', 'PVC-P', 'plasticised PVC', 'plasticized PVC', 'flexible PVC', 'rigid PVC',
      'cast vinyl', 'calendered vinyl', 'calendared vinyl', 'sign vinyl', 'adhesive vinyl', 'vinyl film', 'vinyl sticker', 'vinyl decal', 'pleather'],
    halogens: ['chlorine'], verdict: 'never', why: HCl,
    sources: [LAB_GUIDANCE, CHEMISTRY],
  },
  {
    code: 'CPVC', name: 'Chlorinated PVC (CPVC)',
    names: ['CPVC', 'PVC-C', 'chlorinated PVC', 'chlorinated polyvinyl chloride', 'post-chlorinated PVC'],
    halogens: ['chlorine'], verdict: 'never', why: HCl,
    sources: [CHEMISTRY],
  },
  {
    code: 'PVDC', name: 'Polyvinylidene chloride (PVDC)',
    names: ['PVDC', 'polyvinylidene chloride', 'polyvinylidene dichloride', 'poly(vinylidene chloride)'],
    halogens: ['chlorine'], verdict: 'never', why: HCl,
    sources: [CHEMISTRY],
  },
  {
    code: 'CPE', name: 'Chlorinated polyethylene (CPE)',
    names: ['CPE', 'chlorinated polyethylene', 'chlorinated polythene'],
    halogens: ['chlorine'], verdict: 'never', why: HCl,
    sources: [CHEMISTRY],
  },
  {
    code: 'CSM', name: 'Chlorosulfonated polyethylene (CSM)',
    names: ['CSM', 'CSPE', 'chlorosulfonated polyethylene', 'chlorosulphonated polyethylene'],
    halogens: ['chlorine'], verdict: 'never', why: HCl,
    sources: [CHEMISTRY],
  },
  {
    code: 'CR', name: 'Polychloroprene (CR)',
    names: ['polychloroprene', 'chloroprene', 'chloroprene rubber', 'CR', 'neoprene'],
    halogens: ['chlorine'], verdict: 'never', why: HCl,
    sources: [CHEMISTRY],
  },
  {
    code: 'PTFE', name: 'Polytetrafluoroethylene (PTFE)',
    names: ['PTFE', 'polytetrafluoroethylene', 'poly(tetrafluoroethylene)'],
    halogens: ['fluorine'], verdict: 'never', why: HF,
    sources: [LAB_GUIDANCE, CHEMISTRY],
  },
  {
    code: 'PVF', name: 'Polyvinyl fluoride (PVF)',
    names: ['PVF', 'polyvinyl fluoride', 'poly(vinyl fluoride)', 'polyvinylfluoride'],
    halogens: ['fluorine'], verdict: 'never', why: HF,
    sources: [CHEMISTRY],
  },
  {
    code: 'PVDF', name: 'Polyvinylidene fluoride (PVDF)',
    names: ['PVDF', 'polyvinylidene fluoride', 'polyvinylidene difluoride', 'poly(vinylidene fluoride)'],
    halogens: ['fluorine'], verdict: 'never', why: HF,
    sources: [CHEMISTRY],
  },
  {
    code: 'FEP', name: 'Fluorinated ethylene propylene (FEP)',
    names: ['FEP', 'fluorinated ethylene propylene'],
    halogens: ['fluorine'], verdict: 'never', why: HF,
    sources: [CHEMISTRY],
  },
  {
    code: 'ETFE', name: 'Ethylene tetrafluoroethylene (ETFE)',
    names: ['ETFE', 'ethylene tetrafluoroethylene'],
    halogens: ['fluorine'], verdict: 'never', why: HF,
    sources: [CHEMISTRY],
  },
  {
    code: UNKNOWN_POLYMER, name: 'Not known',
    names: [],
    halogens: [], verdict: 'never',
    why: 'Nobody has recorded what this film is made of. Find its safety data sheet and choose the polymer it names; until then it cannot be placed or cut.',
    sources: [COMMON],
  },
]

export function polymerByCode(code: string): Polymer | undefined {
  return POLYMERS.find((p) => p.code === code)
}

/** Lower case, no accents, punctuation as spaces: "Poly(Vinyl-Chloride)" → "poly vinyl chloride". */
export function normaliseMaterialText(text: string): string {
  return text.normalize('NFKD').replace(/[\u0300-\u036f]/g, '').toLowerCase().replace(/[^a-z0-9]+/g, ' ').trim()
}

/** A name as a pattern that ignores spaces and hyphens between its letters, matched as whole words. */
function namePattern(name: string): RegExp {
  const letters = normaliseMaterialText(name).replace(/ /g, '').split('')
  return new RegExp(`(?<![a-z0-9])${letters.join(' ?')}(?![a-z0-9])`, 'g')
}

const PATTERNS = POLYMERS.flatMap((p) => p.names.map((n) => ({ polymer: p, name: n, pattern: namePattern(n) })))

interface Hit { polymer: Polymer; start: number; end: number }

function hits(text: string): Hit[] {
  const t = normaliseMaterialText(text)
  const found: Hit[] = []
  for (const { polymer, pattern } of PATTERNS) {
    for (const m of t.matchAll(pattern)) found.push({ polymer, start: m.index, end: m.index + m[0].length })
  }
  // A name inside a longer one is part of it: "vinyl" in "PVC-free vinyl", "polyethylene" in
  // "chlorosulfonated polyethylene".
  return found.filter((h) => !found.some((o) => o !== h && o.start <= h.start && o.end >= h.end && o.end - o.start > h.end - h.start))
}

/**
 * The register entry a free-text description names, for moving films that were typed by hand
 * into the register. Safety first: a description that names any halogen-bearing polymer
 * anywhere ("acrylic on a PVC liner") maps to it; otherwise the first material named (the face
 * film comes before "with … adhesive"). Null when nothing is recognised.
 */
export function matchPolymer(text: string): Polymer | null {
  const found = hits(text)
  const halogenated = found.filter((h) => h.polymer.halogens.length > 0)
  const pick = (halogenated.length ? halogenated : found).sort((a, b) => a.start - b.start || (b.end - b.start) - (a.end - a.start))[0]
  return pick?.polymer ?? null
}

/** Entries whose name or any common name contains what the mentor has typed so far, best first. */
export function searchPolymers(query: string): Polymer[] {
  const q = normaliseMaterialText(query).replace(/ /g, '')
  if (!q) return POLYMERS.filter((p) => p.code !== UNKNOWN_POLYMER)
  const scored: { p: Polymer; score: number }[] = []
  for (const p of POLYMERS) {
    let best = Infinity
    for (const n of [p.name, p.code, ...p.names]) {
      const c = normaliseMaterialText(n).replace(/ /g, '')
      const at = c.indexOf(q)
      if (at >= 0) best = Math.min(best, at === 0 ? (c.length === q.length ? 0 : 1) : 2)
    }
    if (best < Infinity) scored.push({ p, score: best })
  }
  return scored.sort((a, b) => a.score - b.score).map((s) => s.p)
}

/** Whether a film of this polymer may be placed or cut, given whether the lab has approved that film. */
export function polymerClears(p: Pick<Polymer, 'verdict'>, labApproved: boolean): boolean {
  return p.verdict === 'allowed' || (p.verdict === 'ask-the-lab' && labApproved)
}
