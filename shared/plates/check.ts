// Checking a robot's number plates against its rule profile.
//
// Pure: the caller gives the robot's plate placements with what was measured on each placed
// revision's vector (scaled to the placement's size) and the colours of the films chosen; the
// answer is one result per rule the profile states, passed or a sentence saying what is missing.
// Spares are not on the robot: only a placement's quantity counts as placed plates.
import {
  PLATE_COLOURS, UPRIGHT_SIDES, lengthMm,
  type Length, type PlateColour, type RobotSide, type RuleProfile, type RuleSource, type SideRule,
} from './profiles'

export interface PlacedPlate {
  side: RobotSide
  /** Free-text spot ("left side panel"), used in sentences when given. */
  spot?: string
  /** Tallest numeral's height as placed, mm (measured from the vector); null if not measured. */
  numeralHeightMm: number | null
  /** Narrowest stroke of the numerals as placed, mm; null if not measured. */
  strokeMm: number | null
  /** Placed plate's size, mm (either way round). */
  plateWidthMm: number | null
  plateHeightMm: number | null
  /** Least distance from the numerals' ink to the plate's edge as placed, mm. */
  marginMm: number | null
  /** Colour of the background film as the film stock names it; null when there is no background layer. */
  backgroundColour: string | null
  /** Colour of the numerals' film as the film stock names it. */
  numeralColour: string | null
  quantity: number
  spares: number
}

export const CHECKED_RULES = [
  'sides', 'alliance-colours', 'numeral-height', 'numeral-stroke', 'numeral-colour', 'plate-size', 'margin', 'background',
] as const
export type CheckedRule = (typeof CHECKED_RULES)[number]

export interface RuleResult {
  rule: CheckedRule
  passed: boolean
  /** Passed: what was found. Not passed: what is missing, then what the rules ask. */
  sentence: string
  source: RuleSource
}

/**
 * Measurements come from vectors on a 0.01 mm grid: a value within this of the limit passes
 * (a plate generated at exactly 4 in may measure 101.59 mm after rounding).
 */
export const MEASURE_SLACK_MM = 0.01

// ---------------------------------------------------------------------------------------
// Words
// ---------------------------------------------------------------------------------------

const COLOUR_WORDS: Record<string, PlateColour> = {
  ...Object.fromEntries(PLATE_COLOURS.map((c) => [c, c])),
  gray: 'grey',
}

/**
 * The rule colour a film's colour name reads as ("Signal red" → red, "off-white" → white),
 * or null when it names none or several different ones.
 */
export function plateColourOf(filmColour: string | null): PlateColour | null {
  if (!filmColour) return null
  const found = new Set<PlateColour>()
  for (const word of filmColour.toLowerCase().split(/[^a-z]+/)) {
    const c = COLOUR_WORDS[word]
    if (c) found.add(c)
  }
  return found.size === 1 ? [...found][0]! : null
}

/** Millimetres to at most two decimals, without trailing zeros. */
export function formatMmText(mm: number): string {
  return String(Math.round(mm * 100) / 100)
}

function formatLength(length: Length): string {
  const mm = `${formatMmText(lengthMm(length))} mm`
  return length.unit === 'in' ? `${mm} (${Math.round(length.value * 1000) / 1000} in)` : mm
}

function orList(words: string[]): string {
  return listWith(words, 'or')
}
function andList(words: string[]): string {
  return listWith(words, 'and')
}
function listWith(words: string[], joiner: string): string {
  if (words.length <= 1) return words[0] ?? ''
  return `${words.slice(0, -1).join(', ')} ${joiner} ${words[words.length - 1]}`
}

const capitalise = (s: string) => s.charAt(0).toUpperCase() + s.slice(1)
const COUNT_WORDS = ['no', 'one', 'two', 'three', 'four']

/** "the front plate" or "the front plate (left bumper)". */
function plateName(p: PlacedPlate): string {
  const side = p.side === 'other' ? 'plate on another side' : `${p.side} plate`
  return p.spot ? `the ${side} (${p.spot})` : `the ${side}`
}

// ---------------------------------------------------------------------------------------
// Sides
// ---------------------------------------------------------------------------------------

type Upright = (typeof UPRIGHT_SIDES)[number]
const OPPOSITE: Record<Upright, Upright> = { front: 'back', back: 'front', left: 'right', right: 'left' }
const isUpright = (s: RobotSide): s is Upright => (UPRIGHT_SIDES as readonly string[]).includes(s)

function sideDemand(rule: SideRule): string {
  if (rule.kind === 'apart-90') return `${COUNT_WORDS[rule.count]} plates at least 90° apart`
  if (rule.kind === 'opposite') return 'two opposite sides'
  return 'numerals readable from every side (front, back, left and right)'
}

/** Upright sides lacking for the rule, given the sides that have a placed plate; [] when met. */
function missingSides(rule: SideRule, present: Set<Upright>): Upright[] | 'more' {
  if (rule.kind === 'every-side') return UPRIGHT_SIDES.filter((s) => !present.has(s))
  if (rule.kind === 'apart-90') return present.size >= rule.count ? [] : 'more'
  if ((present.has('front') && present.has('back')) || (present.has('left') && present.has('right'))) return []
  if (present.size === 0) return 'more'
  return UPRIGHT_SIDES.filter((s) => present.has(s)).map((s) => OPPOSITE[s])
}

interface SideFinding { met: boolean; missing: string; found: string }

/** What the placed plates (those of one colour, when `colour` is given) lack for the side rule. */
function sideFinding(rule: SideRule, plates: PlacedPlate[], colour?: PlateColour): SideFinding {
  const placed = plates.filter((p) => p.quantity > 0)
  const present = new Set<Upright>(placed.map((p) => p.side).filter(isUpright))
  const what = colour ? `${colour} plate` : 'plate'
  const missing = missingSides(rule, present)
  const presentList = UPRIGHT_SIDES.filter((s) => present.has(s))
  const found = `${capitalise(what)}s on the ${andList(presentList)}`
  if (Array.isArray(missing) && missing.length === 0) return { met: true, missing: '', found }
  // Sides that have only spares: say why they do not count.
  const spareOnly = (side: RobotSide) => plates.some((p) => p.side === side && p.quantity <= 0 && p.spares > 0)
    && !placed.some((p) => p.side === side)
  let text: string
  if (missing === 'more') {
    if (placed.length === 0) text = `No ${what} placed`
    else if (present.size === 0) text = `No ${what} on the front, back, left or right (a plate on the top or elsewhere does not count)`
    else text = `${capitalise(what)}s only on the ${andList(presentList)}`
    const spares = UPRIGHT_SIDES.filter(spareOnly)
    if (spares.length) text += ` (the spares for the ${andList(spares)} are not placed plates)`
  } else {
    text = `No ${what} on the ${orList(missing.map(String))}`
    const spares = missing.filter(spareOnly)
    if (spares.length) text += ` (the spares for the ${andList(spares)} are not placed plates)`
  }
  return { met: false, missing: text, found }
}

function checkSides(profile: RuleProfile, plates: PlacedPlate[]): RuleResult {
  const rule = profile.sides.value
  const f = sideFinding(rule, plates)
  return {
    rule: 'sides', source: profile.sides.source, passed: f.met,
    sentence: f.met ? `${f.found}: ${sideDemand(rule)}, as the rules ask.` : `${f.missing}: the rules ask for ${sideDemand(rule)}.`,
  }
}

function checkAlliance(profile: RuleProfile, plates: PlacedPlate[]): RuleResult | null {
  const alliance = profile.allianceColours
  if (!alliance) return null
  const rule = profile.sides.value
  const colours = alliance.value
  const demand = `${andList(colours)} plates, each on ${rule.kind === 'opposite' ? sideDemand(rule) : `the sides asked (${sideDemand(rule)})`}`
  const gaps: string[] = []
  for (const colour of colours) {
    const own = plates.filter((p) => plateColourOf(p.backgroundColour) === colour)
    const f = sideFinding(rule, own, colour)
    if (!f.met) gaps.push(f.missing)
  }
  const passed = gaps.length === 0
  return {
    rule: 'alliance-colours', source: alliance.source, passed,
    // One sentence: only its first gap starts with a capital.
    sentence: passed ? `${capitalise(demand)}, as the rules ask.` : `${gaps.map((g, i) => (i ? g.charAt(0).toLowerCase() + g.slice(1) : g)).join('; ')}: the rules ask for ${demand}.`,
  }
}

// ---------------------------------------------------------------------------------------
// Per-plate rules
// ---------------------------------------------------------------------------------------

interface PlateRule {
  rule: CheckedRule
  source: RuleSource
  /** What the rules ask, after "the rules ask for". */
  demand: string
  /** Why this plate fails, or null when it passes. */
  fault: (p: PlacedPlate) => string | null
  /** Sentence when every placed plate passes. */
  passed: string
}

function judgePlates(rule: PlateRule, plates: PlacedPlate[]): RuleResult {
  const placed = plates.filter((p) => p.quantity > 0)
  const faults = placed.map(rule.fault).filter((f): f is string => f !== null)
  if (placed.length === 0) {
    return { rule: rule.rule, source: rule.source, passed: false, sentence: `No plate is placed to measure: the rules ask for ${rule.demand}.` }
  }
  if (faults.length === 0) return { rule: rule.rule, source: rule.source, passed: true, sentence: rule.passed }
  return { rule: rule.rule, source: rule.source, passed: false, sentence: `${capitalise(faults.join('; '))}: the rules ask for ${rule.demand}.` }
}

function heightRule(profile: RuleProfile): PlateRule | null {
  const lo = profile.numerals.minHeight, hi = profile.numerals.maxHeight
  if (!lo && !hi) return null
  const min = lo ? lengthMm(lo.value) : -Infinity
  const max = hi ? lengthMm(hi.value) : Infinity
  let demand: string
  if (lo && hi) {
    const inches = lo.value.unit === 'in' && hi.value.unit === 'in' ? ` (${lo.value.value} to ${hi.value.value} in)` : ''
    demand = `numerals ${formatMmText(min)} to ${formatMmText(max)} mm tall${inches}`
  } else demand = `numerals ${lo ? `at least ${formatLength(lo.value)}` : `at most ${formatLength(hi!.value)}`} tall`
  return {
    rule: 'numeral-height', source: (lo ?? hi)!.source, demand,
    passed: `Numeral height is within the rules on every placed plate: the rules ask for ${demand}.`,
    fault: (p) => {
      if (p.numeralHeightMm === null) return `the numeral height of ${plateName(p)} has not been measured`
      const h = p.numeralHeightMm
      if (h < min - MEASURE_SLACK_MM || h > max + MEASURE_SLACK_MM) return `the numerals on ${plateName(p)} are ${formatMmText(h)} mm tall`
      return null
    },
  }
}

function strokeRule(profile: RuleProfile): PlateRule | null {
  const s = profile.numerals.minStroke
  if (!s) return null
  const min = lengthMm(s.value)
  const demand = `strokes at least ${formatLength(s.value)} wide`
  return {
    rule: 'numeral-stroke', source: s.source, demand,
    passed: `The numerals' narrowest stroke is at least ${formatLength(s.value)} on every placed plate.`,
    fault: (p) => {
      if (p.strokeMm === null) return `the stroke of the numerals on ${plateName(p)} has not been measured`
      if (p.strokeMm < min - MEASURE_SLACK_MM) return `the narrowest stroke of the numerals on ${plateName(p)} is ${formatMmText(p.strokeMm)} mm`
      return null
    },
  }
}

function colourRule(rule: 'numeral-colour' | 'background', allowed: { value: PlateColour[]; source: RuleSource }): PlateRule {
  const words = orList(allowed.value)
  const numerals = rule === 'numeral-colour'
  const demand = numerals ? `${words} numerals` : `a ${words} background`
  return {
    rule, source: allowed.source, demand,
    passed: numerals ? `The numerals are ${words} on every placed plate.` : `Every placed plate has a ${words} background.`,
    fault: (p) => {
      const film = numerals ? p.numeralColour : p.backgroundColour
      const what = numerals ? `the numeral film of ${plateName(p)}` : `the background film of ${plateName(p)}`
      if (!film) return numerals ? `${what} has no colour recorded` : `${plateName(p)} has no background film`
      const c = plateColourOf(film)
      if (c === null) return `${what} is “${film}”, not a colour the check can read`
      if (allowed.value.includes(c)) return null
      return numerals ? `the numerals on ${plateName(p)} are ${c}` : `${plateName(p)} is ${c}`
    },
  }
}

function sizeRule(profile: RuleProfile): PlateRule | null {
  const w = profile.plate.minWidth, h = profile.plate.minHeight
  if (!w && !h) return null
  const minLong = w ? lengthMm(w.value) : 0, minShort = h ? lengthMm(h.value) : 0
  let demand: string
  if (w && h) {
    const inches = w.value.unit === 'in' && h.value.unit === 'in' ? ` (${w.value.value} × ${h.value.value} in)` : ''
    demand = `a plate at least ${formatMmText(minLong)} × ${formatMmText(minShort)} mm${inches}`
  } else demand = w ? `a plate at least ${formatLength(w.value)} on its longer side` : `a plate at least ${formatLength(h!.value)} on its shorter side`
  return {
    rule: 'plate-size', source: (w ?? h)!.source, demand,
    passed: `Every placed plate is large enough: the rules ask for ${demand}.`,
    fault: (p) => {
      if (p.plateWidthMm === null || p.plateHeightMm === null) return `the size of ${plateName(p)} is not known`
      // A plate may be placed either way round: compare longer with longer, shorter with shorter.
      const long = Math.max(p.plateWidthMm, p.plateHeightMm), short = Math.min(p.plateWidthMm, p.plateHeightMm)
      if (long < minLong - MEASURE_SLACK_MM || short < minShort - MEASURE_SLACK_MM) {
        return `${plateName(p)} is ${formatMmText(p.plateWidthMm)} × ${formatMmText(p.plateHeightMm)} mm`
      }
      return null
    },
  }
}

function marginRule(profile: RuleProfile): PlateRule | null {
  const m = profile.plate.margin
  if (!m) return null
  const min = lengthMm(m.value)
  const demand = `a margin of at least ${formatLength(m.value)} around the numerals`
  return {
    rule: 'margin', source: m.source, demand,
    passed: `Every placed plate keeps at least ${formatLength(m.value)} around its numerals.`,
    fault: (p) => {
      if (p.marginMm === null) return `the margin of ${plateName(p)} has not been measured`
      if (p.marginMm < min - MEASURE_SLACK_MM) return `the numerals on ${plateName(p)} are ${formatMmText(p.marginMm)} mm from its edge`
      return null
    },
  }
}

// ---------------------------------------------------------------------------------------
// The check
// ---------------------------------------------------------------------------------------

/** One result per rule the profile states, in the order of CHECKED_RULES. */
export function checkRobotPlates(profile: RuleProfile, plates: PlacedPlate[]): RuleResult[] {
  const out: RuleResult[] = [checkSides(profile, plates)]
  const alliance = checkAlliance(profile, plates)
  if (alliance) out.push(alliance)
  const rules = [
    heightRule(profile),
    strokeRule(profile),
    profile.numerals.colours ? colourRule('numeral-colour', profile.numerals.colours) : null,
    sizeRule(profile),
    marginRule(profile),
    profile.plate.backgrounds ? colourRule('background', profile.plate.backgrounds) : null,
  ]
  for (const r of rules) if (r) out.push(judgePlates(r, plates))
  return out
}

/**
 * What was measured on a revision at its own width, scaled to a placement's width (a placement
 * scales the whole revision evenly). Null measurements stay null.
 */
export function scaleToPlacement<T extends Record<string, number | null>>(measured: T, revisionWidthMm: number, placementWidthMm: number): T {
  if (!(revisionWidthMm > 0) || !(placementWidthMm > 0)) throw new RangeError('Widths must be positive millimetres.')
  const k = placementWidthMm / revisionWidthMm
  const out: Record<string, number | null> = {}
  for (const [key, v] of Object.entries(measured)) out[key] = v === null ? null : v * k
  return out as T
}
