// Number plates generated from a team number, a rule profile and a shipped font: an exact
// vector (glyph outlines, not a traced picture), one layer per colour, each a clean vector in
// millimetres in the same form as the pipeline's (server/pipeline/clean.ts), so measurements
// and cut sheets read it like any revision.
//
// Layout:
//  - scale: the tallest glyph of the number (ink height from its own outline, in font units)
//    is made exactly the asked numeral height; a letter after the digits counts as part of the
//    number;
//  - spacing: each glyph's origin advances by its advance width (no kerning, no tracking);
//  - the ink's bounding box is centred on the plate; the plate is the profile's smallest plate,
//    grown where the numerals and the margin need more room; sizes are rounded up to 0.01 mm.
import type opentype from 'opentype.js'
import { lengthMm, type PlateColour, type RuleProfile } from '../../shared/plates/profiles'
import { normaliseTeamNumber } from '../../shared/plates/team-number'
import { cleanVector } from '../pipeline/clean'
import { measureCurves } from '../pipeline/geometry'
import type { ClosedCurve } from '../pipeline/trace'
import { DEFAULT_MARKS, registrationFrame, withRegistrationMarks, type MarkSettings, type RegistrationFrame } from '../pipeline/colour/marks'
import { stackedPreviewSvg } from '../pipeline/colour/preview'
import { DEFAULT_STACK, layerVector, stackLayers, type StackSettings } from '../pipeline/colour/stack'
import type { PlateFont } from './font'
import { glyphContours, rectangleContour, signByNesting, type Contour } from './outline'

/** Margin when the profile states none: our choice, enough to weed and to hold the plate's edge. */
export const DEFAULT_MARGIN_MM = 6
/** Corner radius of the background: our choice; rounded corners lift less easily than square ones (common practice). */
export const DEFAULT_CORNER_RADIUS_MM = 3

/** A request the profile or the font cannot satisfy; the message is a sentence for the form. */
export class PlateRequestError extends Error {
  constructor(message: string) {
    super(message)
    this.name = 'PlateRequestError'
  }
}

export interface PlateRequest {
  /** Digits, maybe one letter after them ("1234", "4321B"); trimmed and upper-cased. */
  teamNumber: string
  profile: RuleProfile
  font: PlateFont
  /** Height of the tallest numeral, mm. Default: see defaultNumeralHeightMm. */
  numeralHeightMm?: number
  /** Least distance from the numerals to the plate's edge, mm. Default: the profile's, else DEFAULT_MARGIN_MM. */
  marginMm?: number
  cornerRadiusMm?: number
  /** Numeral colour; default the profile's first. */
  numeralColour?: PlateColour
  /**
   * The background plate: its colour (default the profile's first) and whether it lies under
   * the numerals whole ('under') or has their shapes cut out ('knock-out'). null: no background
   * layer (the default when the profile asks for none, e.g. numerals straight on a bumper).
   */
  background?: { colour?: PlateColour; style?: 'under' | 'knock-out' } | null
}

export type PlateLayerRole = 'background' | 'numerals'

export interface PlateLayer {
  role: PlateLayerRole
  colour: PlateColour
  /** The clean vector: width/height and viewBox in mm, paths only, even-odd fill. */
  svg: string
  widthMm: number
  heightMm: number
  nodeCount: number
  /** The curves as written (0.01 mm grid), with ink (+1) and hole (−1) marked. */
  curvesMm: ClosedCurve[]
}

export interface GeneratedPlate {
  teamNumber: string
  profileKey: string
  font: { id: string; family: string; style: string; licence: string }
  widthMm: number
  heightMm: number
  numeralHeightMm: number
  marginMm: number
  cornerRadiusMm: number
  /** True when the plate is larger than the profile's smallest plate (the numerals needed room). */
  grown: boolean
  /** How the background meets the numerals (null: no background). */
  backgroundStyle: 'under' | 'knock-out' | null
  /** Bottom to top, in register: every layer has the plate's size and origin. */
  layers: PlateLayer[]
}

interface GlyphBox { minX: number; minY: number; maxX: number; maxY: number }

interface NumberLayout {
  glyphs: opentype.Glyph[]
  /** Each glyph's origin along the line, font units. */
  origins: number[]
  /** Ink box of the whole number, font units, y up. */
  ink: GlyphBox
  /** Ink height of the tallest glyph, font units. */
  tallest: number
}

/** The glyphs of a number laid on one line by their advance widths, measured from their outlines. */
export function layoutNumber(teamNumber: string, font: PlateFont): NumberLayout {
  const glyphs: opentype.Glyph[] = []
  const origins: number[] = []
  let pen = 0, tallest = 0
  const ink: GlyphBox = { minX: Infinity, minY: Infinity, maxX: -Infinity, maxY: -Infinity }
  for (const ch of teamNumber) {
    const g = font.font.charToGlyph(ch)
    if (!g || g.index === 0) throw new PlateRequestError(`The font ${font.info.family} ${font.info.style} has no “${ch}”.`)
    // Font units, y up: contours at scale 1 with the baseline at y = 0 come out y down, so flip back.
    const b = measureCurves(glyphContours(g, 0, 0, 1).map((c) => ({ sign: 1, segments: c.segments })), 1).bounds
    if (!b) throw new PlateRequestError(`The font's “${ch}” has no outline.`)
    const box = { minX: b.minX, maxX: b.maxX, minY: -b.maxY, maxY: -b.minY }
    glyphs.push(g)
    origins.push(pen)
    ink.minX = Math.min(ink.minX, pen + box.minX)
    ink.maxX = Math.max(ink.maxX, pen + box.maxX)
    ink.minY = Math.min(ink.minY, box.minY)
    ink.maxY = Math.max(ink.maxY, box.maxY)
    tallest = Math.max(tallest, box.maxY - box.minY)
    pen += g.advanceWidth ?? 0
  }
  return { glyphs, origins, ink, tallest }
}

const ceil2 = (v: number) => Math.ceil(v * 100 - 1e-7) / 100

function heightLimits(profile: RuleProfile): { min: number; max: number } {
  const lo = profile.numerals.minHeight, hi = profile.numerals.maxHeight
  return { min: lo ? lengthMm(lo.value) : 0, max: hi ? lengthMm(hi.value) : Infinity }
}

function marginFor(profile: RuleProfile, asked: number | undefined): number {
  const least = profile.plate.margin ? lengthMm(profile.plate.margin.value) : 0
  const m = asked ?? (profile.plate.margin ? least : DEFAULT_MARGIN_MM)
  if (!(m >= 0) || !Number.isFinite(m)) throw new PlateRequestError('The margin must be a length of 0 mm or more.')
  if (m < least - 1e-9) throw new PlateRequestError(`A margin of ${m} mm is below the ${least} mm the rules ask for.`)
  return m
}

/**
 * The numeral height used when none is asked: the largest that fits the profile's smallest
 * plate with its margin, kept within the profile's height range; without a plate size, the
 * smallest height allowed (or the largest, when only that is stated).
 */
export function defaultNumeralHeightMm(profile: RuleProfile, layout: NumberLayout, marginMm: number): number {
  const { min, max } = heightLimits(profile)
  const w = profile.plate.minWidth, h = profile.plate.minHeight
  let fit: number | null = null
  if (w || h) {
    const inkW = layout.ink.maxX - layout.ink.minX, inkH = layout.ink.maxY - layout.ink.minY
    const byWidth = w ? ((lengthMm(w.value) - 2 * marginMm) / inkW) * layout.tallest : Infinity
    const byHeight = h ? ((lengthMm(h.value) - 2 * marginMm) / inkH) * layout.tallest : Infinity
    fit = Math.min(byWidth, byHeight)
  }
  const base = fit ?? (min > 0 ? min : max)
  if (!Number.isFinite(base) || !(base > 0)) {
    throw new PlateRequestError('Give the numeral height: the profile states neither a height nor a plate size.')
  }
  return Math.min(Math.max(base, min), max)
}

function colourFor(kind: 'numeral' | 'background', allowed: PlateColour[] | undefined, asked: PlateColour | undefined, fallback: PlateColour): PlateColour {
  const c = asked ?? allowed?.[0] ?? fallback
  if (allowed && !allowed.includes(c)) throw new PlateRequestError(`A ${c} ${kind === 'numeral' ? 'numeral' : 'background'} is not allowed: the rules ask for ${allowed.join(' or ')}.`)
  return c
}

function layer(role: PlateLayerRole, colour: PlateColour, contours: Contour[], widthMm: number, heightMm: number): PlateLayer {
  const clean = cleanVector({ curves: signByNesting(contours), width: widthMm, height: heightMm, pxPerMm: 1 })
  return { role, colour, svg: clean.svg, widthMm: clean.widthMm, heightMm: clean.heightMm, nodeCount: clean.nodeCount, curvesMm: clean.curvesMm }
}

export function generatePlate(req: PlateRequest): GeneratedPlate {
  const { profile, font } = req
  let teamNumber: string
  try {
    teamNumber = normaliseTeamNumber(req.teamNumber)
  } catch {
    throw new PlateRequestError('The team number must be 1 to 6 digits, maybe followed by one letter.')
  }
  const layout = layoutNumber(teamNumber, font)
  const marginMm = marginFor(profile, req.marginMm)
  const numeralHeightMm = req.numeralHeightMm ?? defaultNumeralHeightMm(profile, layout, marginMm)
  const { min, max } = heightLimits(profile)
  if (!(numeralHeightMm > 0) || !Number.isFinite(numeralHeightMm)) throw new PlateRequestError('The numeral height must be a positive length.')
  if (numeralHeightMm < min - 1e-9 || numeralHeightMm > max + 1e-9) {
    throw new PlateRequestError(`Numerals ${numeralHeightMm} mm tall are outside the rules' ${min} to ${Number.isFinite(max) ? max : '—'} mm.`)
  }

  const s = numeralHeightMm / layout.tallest // mm per font unit
  const inkW = (layout.ink.maxX - layout.ink.minX) * s
  const inkH = (layout.ink.maxY - layout.ink.minY) * s
  const minW = profile.plate.minWidth ? lengthMm(profile.plate.minWidth.value) : 0
  const minH = profile.plate.minHeight ? lengthMm(profile.plate.minHeight.value) : 0
  const widthMm = ceil2(Math.max(minW, inkW + 2 * marginMm))
  const heightMm = ceil2(Math.max(minH, inkH + 2 * marginMm))
  const grown = (minW > 0 && widthMm > ceil2(minW)) || (minH > 0 && heightMm > ceil2(minH))

  // Centre the ink box: its left edge at (W − inkW)/2, its top at (H − inkH)/2.
  const left = (widthMm - inkW) / 2 - layout.ink.minX * s
  const baseline = (heightMm - inkH) / 2 + layout.ink.maxY * s
  const numerals = layout.glyphs.flatMap((g, i) => glyphContours(g, left + layout.origins[i]! * s, baseline, s))

  const cornerRadiusMm = req.cornerRadiusMm ?? Math.min(DEFAULT_CORNER_RADIUS_MM, marginMm)
  const wantsBackground = req.background !== undefined ? req.background !== null : profile.plate.backgrounds !== null
  const numeralColour = colourFor('numeral', profile.numerals.colours?.value, req.numeralColour, 'white')
  const layers: PlateLayer[] = []
  if (wantsBackground) {
    const colour = colourFor('background', profile.plate.backgrounds?.value, req.background?.colour, 'black')
    const plate = rectangleContour(0, 0, widthMm, heightMm, cornerRadiusMm)
    const knockOut = req.background?.style === 'knock-out'
    layers.push(layer('background', colour, knockOut ? [plate, ...numerals] : [plate], widthMm, heightMm))
  }
  layers.push(layer('numerals', numeralColour, numerals, widthMm, heightMm))
  return {
    teamNumber, profileKey: profile.key,
    font: { id: font.info.id, family: font.info.family, style: font.info.style, licence: font.info.licence },
    widthMm, heightMm, numeralHeightMm, marginMm, cornerRadiusMm, grown,
    backgroundStyle: wantsBackground ? (req.background?.style ?? 'under') : null, layers,
  }
}

/** The swatch each plate colour is drawn in until a film is chosen (our own choice of shades). */
export const PLATE_COLOUR_HEX: Record<PlateColour, string> = {
  white: '#ffffff', black: '#1a1a1a', red: '#c62828', blue: '#1f4fa3', yellow: '#f2c200',
  green: '#2e7d32', orange: '#e8710a', purple: '#6a3d9a', grey: '#8a8a8a',
}

export interface FramedPlateLayer {
  role: PlateLayerRole
  colour: PlateColour
  hex: string
  /** The layer's clean vector as cut: stacked, on the framed canvas, with the registration marks. */
  svg: string
}

/** A plate as one layered decal: every layer on one framed canvas with the same marks. */
export interface FramedPlate {
  frame: RegistrationFrame
  /** The plate's own box in the framed canvas, mm. */
  plateBox: { x0: number; y0: number; x1: number; y1: number }
  /** How each layer meets the ones above, bottom first (as the multi-colour work records it). */
  stack: StackSettings[]
  /** Bottom first. */
  layers: FramedPlateLayer[]
  /** Every layer in its colour, a group per layer, bottom first, in mm. */
  stackedSvg: string
}

/**
 * The plate's layers stacked and framed like a traced layered decal: a background cut out
 * under the numerals ('knock-out') keeps the multi-colour work's overlap (DEFAULT_STACK's
 * distance) under their edges; a whole background ('under') already lies under every numeral,
 * so no overlap can add to it and it keeps its exact curves. Then the registration marks
 * (server/pipeline/colour/marks.ts) go round the plate, the same in every layer.
 */
export function framePlate(plate: GeneratedPlate, marks: MarkSettings = DEFAULT_MARKS): FramedPlate {
  const canvas = { widthMm: plate.widthMm, heightMm: plate.heightMm }
  const stack: StackSettings[] = plate.layers.map((l) => l.role === 'background' && plate.backgroundStyle === 'knock-out'
    ? { mode: 'knock-out', overlapMm: DEFAULT_STACK.overlapMm }
    : { mode: 'under', overlapMm: 0 })
  const stacked = stackLayers(plate.layers.map((l) => ({ curves: l.curvesMm })), canvas, stack)
  // The marks go round the plate's edge, not just the ink: a plate is its whole rectangle.
  const edge = { curves: signByNesting([rectangleContour(0, 0, plate.widthMm, plate.heightMm, 0)]) }
  const frame = registrationFrame([edge, ...stacked], canvas, marks)
  const layers = stacked.map((l, i) => {
    const src = plate.layers[i]!
    const framed = layerVector(withRegistrationMarks(l.curves, frame), frame)
    return { role: src.role, colour: src.colour, hex: PLATE_COLOUR_HEX[src.colour], svg: framed.svg }
  })
  return {
    frame, stack, layers,
    plateBox: { x0: frame.shift.x, y0: frame.shift.y, x1: frame.shift.x + plate.widthMm, y1: frame.shift.y + plate.heightMm },
    stackedSvg: stackedPreviewSvg(layers.map((l) => ({ svg: l.svg, hex: l.hex }))),
  }
}
