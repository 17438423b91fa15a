// The automatic clean-up's analysis: on a shrunk copy of the source, decide what a careful
// designer would, and say why in one plain sentence per choice.
//
// In order: straighten the sheet (its four corners) → lighting evening (does the paper's
// brightness vary?) → ruled or grid lines (thin, straight, evenly spaced across the sheet) →
// ink colour (is part of the ink a colour that luma would lose?) → colour dropout (are the
// lines a colour the ink is not?) → threshold method (are ink and paper far apart, or is the
// drawing faint?). Then the copy is cleaned up with those choices, so the drawing's extent
// (for trimming) and the checks that it is a drawing at all are made on it.
//
// Each choice follows the settings: 'auto' lets the analysis decide; any other value is used
// as it is (and reported as the designer's).
import type { CleanUpChoice } from '../../shared/types/pipeline'
import type { PipelineSettings, ThresholdSetting } from '../../shared/utils/settings'
import { ADAPTIVE_DEFAULTS } from '../../shared/utils/settings'
import {
  chroma, colourName, colourOfDensity, densityReader, densityDirection, densityGrey, estimatePaperColour, fromHex,
  hue, orthonormal, toHex, type PaperColour, type Rgb,
} from './colour'
import { inkBox, piecesOf, type Box, type Piece } from './components'
import { squaredDistanceTransform } from './distance'
import { fromSheet, sourceFrame, turnFrame, type Frame } from './frame'
import { multiply, scaling, warpBilinear, type Pt } from './homography'
import { paperEstimate } from './lighting'
import { findPaperLines, removeLines, type LineFamily } from './lines'
import { LUMA, toGrey } from './luma'
import { histogram, otsuDetails } from './otsu'
import { sauvolaBitmap, windowPx } from './sauvola'
import { findSheet, sheetFrame, type Quad } from './sheet'

/** Long side of the shrunk copy the analysis works on, px. */
export const ANALYSIS_SIDE = 800

/** The paper is uneven when its darkest part is this much darker than its brightest. */
export const UNEVEN_PAPER = 0.12
/** Below this ink contrast (darkest strokes against the paper), the drawing counts as faint. */
export const FAINT_INK = 0.45
/** Share of the sheet left out along its edges when straightened (the paper's own edge). */
export const SHEET_INSET = 0.008

export interface AnalysisInput {
  /** The upright (and cropped) source shrunk to the analysis copy: R′G′B′, 3 bytes a pixel. */
  rgb: Uint8Array
  width: number
  height: number
  /** Analysis pixels per source pixel. */
  scale: number
  /** Size of the upright, cropped source, px. */
  sourceWidth: number
  sourceHeight: number
  /** The camera's principal point (the whole photo's centre), in cropped source pixels. */
  principal: Pt
  /** Size of the whole upright photo, px. */
  uprightWidth: number
  uprightHeight: number
  /** Long side of the whole upright photo, px. */
  photoLongSide: number
  /** Offset of the crop in the upright source (manual corners are given on the whole source). */
  cropOffset: Pt
  settings: PipelineSettings
  /** What the requested width measures: the whole frame, or the drawing's ink. */
  widthOf: 'frame' | 'drawing'
  widthMm: number
  /** Pieces smaller than this at the decal's size are lost when weeding (the film's limit), mm²; 1 when not given. */
  smallPieceMm2?: number
}

type DensityReader = ReturnType<typeof densityReader>

export interface LightingChoice { on: boolean, strength: number }

export interface Analysis {
  frame: Frame
  /** Analysis pixels per frame pixel (the analysis frame is the frame at this scale). */
  scale: number
  /** The analysis frame: the frame at `scale`. */
  width: number
  height: number
  paper: PaperColour
  /** Paper brightness (luma) on the analysis frame. */
  paperMap: Uint8Array
  lighting: LightingChoice
  reading: 'luma' | 'density'
  /** Density directions read as paper, orthonormal. */
  dropped: Rgb[]
  /** Lines found on the analysis frame (px of the analysis frame). */
  lines: LineFamily[]
  removeLines: boolean
  threshold: Exclude<ThresholdSetting, { mode: 'auto' }>
  /** Bounding box of the drawing's ink in frame pixels (continuous, exclusive end), or null. */
  ink: { x0: number, y0: number, x1: number, y1: number } | null
  /** Analysis-frame pixels per millimetre of the decal. */
  pxPerMm: number
  choices: CleanUpChoice[]
  /** Facts for the checks that this is a drawing at all. */
  facts: DrawingFacts
  /** Milliseconds spent in each step, for the benchmark. */
  timings: Record<'sheet' | 'frame' | 'paper' | 'lines' | 'colours' | 'threshold' | 'pieces', number>
}

export interface DrawingFacts {
  inkShare: number
  /** Grey levels between the paper and the darkest strokes (Otsu's classes); little means no ink at all. */
  contrastLevels: number
  /** Mean grey level of the reading. */
  meanGrey: number
  /** Share of pixels between ink and paper (neither): high in photographs of scenes. */
  midShare: number
  /** Otsu's separability η = σ_B² / σ_T² of the grey reading. */
  separability: number
  /** Pieces of ink above the speck filter, and how many of them are smaller than the film's weeding limit at the decal's size. */
  pieces: number
  smallPieces: number
  /** Share of the ink area in pieces under the weeding limit. */
  smallInkShare: number
  /** Share of all the ink in pieces under the speck filter at the decal's size: what the decal leaves out. */
  speckInkShare: number
  /**
   * How much the paper's hue varies: the 75th percentile of the distance between the paper
   * pixels' channel ratios and the paper's own (0 for paper of one colour, however lit).
   */
  paperHueSpread: number
}

const pct = (v: number) => `${Math.round(v * 100)} %`
const mm = (v: number) => (Math.round(v * 10) / 10).toFixed(1)

function regionName(cells: number[]): string {
  // cells: 3 × 3 mean brightness of the paper, row-major; NaN where there is no paper
  const names = ['top left', 'top', 'top right', 'left', 'middle', 'right', 'bottom left', 'bottom', 'bottom right']
  const known = cells.map((v, i) => [v, i] as const).filter(([v]) => !Number.isNaN(v))
  if (!known.length) return 'middle'
  const centre = cells[4]!
  const border = known.filter(([, i]) => i !== 4).map(([v]) => v)
  if (!Number.isNaN(centre) && border.length >= 6 && border.every((v) => v < centre)
    && Math.max(...border) - Math.min(...border) < 0.5 * (centre - Math.min(...border))) return 'edges'
  let dark = known[0]!
  for (const k of known) if (k[0] < dark[0]) dark = k
  return names[dark[1]]!
}

/**
 * Lighting: how much the bare paper's brightness varies over the sheet, and where it is
 * darkest. Measured on the paper itself (pixels within a tenth of the paper estimate there),
 * as the median of each cell of a 9 × 9 grid, so ink (also ink along the edges, where the
 * estimate has nothing to go by) does not count.
 */
function lightingChoice(luma: Uint8Array, map: Uint8Array, w: number, h: number, settings: PipelineSettings): { choice: LightingChoice, reason: string } {
  const G = 9
  // One flat histogram per cell, and each column's and row's cell worked out once.
  const hist = new Uint32Array(G * G * 256)
  const counts = new Uint32Array(G * G), totals = new Uint32Array(G * G)
  const colCell = new Int32Array(w)
  for (let x = 0; x < w; x++) colCell[x] = Math.min(G - 1, Math.floor((G * x) / w))
  for (let y = 0; y < h; y++) {
    const row = Math.min(G - 1, Math.floor((G * y) / h)) * G
    for (let x = 0, i = y * w; x < w; x++, i++) {
      const c = row + colCell[x]!
      const v = luma[i]!
      totals[c]!++
      if (v * 10 >= map[i]! * 9) { hist[(c << 8) | v]!++; counts[c]!++ }
    }
  }
  const hists = Array.from({ length: G * G }, (_, c) => hist.subarray(c << 8, (c + 1) << 8))
  const cells: (number | null)[] = hists.map((hist, c) => {
    if (!counts[c] || counts[c]! < 0.05 * totals[c]!) return null
    let acc = 0
    for (let v = 0; v < 256; v++) { acc += hist[v]!; if (acc * 2 >= counts[c]!) return v }
    return 255
  })
  const known = cells.filter((v): v is number => v !== null).sort((a, b) => a - b)
  const drop = known.length && known[known.length - 1]! > 0 ? 1 - known[0]! / known[known.length - 1]! : 0
  // 3 × 3 regions for naming where it is darkest
  const region = new Array<number>(9).fill(0), rn = new Array<number>(9).fill(0)
  cells.forEach((v, c) => {
    if (v === null) return
    const r = Math.floor(Math.floor(c / G) / 3) * 3 + Math.floor((c % G) / 3)
    region[r]! += v; rn[r]!++
  })
  const means = region.map((v, r) => (rn[r] ? v / rn[r]! : Number.NaN))
  const where = regionName(means)
  const strength = settings.lightingEvening.strength
  const seen = drop >= UNEVEN_PAPER
    ? `The paper is ${pct(drop)} darker ${where === 'edges' ? 'towards the edges' : `at the ${where}`} than where it is brightest`
    : `The paper's brightness is even (within ${pct(drop)})`
  if (settings.lightingEvening.mode === 'auto' && settings.swapInkAndPaper) {
    // Evening divides by the brightest nearby level, taken for the paper: on a dark page that is
    // the drawing itself, and the page around it would come out as a halo of ink.
    return { choice: { on: false, strength }, reason: 'Ink and paper are swapped (a light drawing on a dark page): lighting evening, which takes the light part for the paper, is off.' }
  }
  if (settings.lightingEvening.mode === 'auto') {
    const on = drop >= UNEVEN_PAPER
    return { choice: { on, strength }, reason: `${seen}: lighting evening ${on ? 'on' : 'off'}.` }
  }
  const on = settings.lightingEvening.mode === 'on'
  return { choice: { on, strength }, reason: `${seen}; lighting evening ${on ? 'on' : 'off'}, as set.` }
}

/** Median of each density channel over the pixels along a family's lines. */
function lineDensity(d: DensityReader, w: number, h: number, f: LineFamily): Rgb {
  const vals: number[][] = [[], [], []]
  const horizontal = f.orientation === 'horizontal'
  const along = horizontal ? w : h, across = horizontal ? h : w
  for (const o of f.offsets) {
    for (let a = 0; a < along; a += 2) {
      const c = Math.round(o + f.slope * a)
      if (c < 0 || c >= across) continue
      const v = d.at(horizontal ? c * w + a : a * w + c)
      for (let k = 0; k < 3; k++) vals[k]!.push(v[k]!)
    }
  }
  return vals.map((v) => { v.sort((a, b) => a - b); return v.length ? v[v.length >> 1]! : 0 }) as Rgb
}

/** Mark the pixels within a line's band (for leaving them out of the ink's colour). */
function lineMask(w: number, h: number, families: LineFamily[]): Uint8Array {
  const m = new Uint8Array(w * h)
  for (const f of families) {
    const horizontal = f.orientation === 'horizontal'
    const along = horizontal ? w : h, across = horizontal ? h : w
    const r = Math.ceil(f.thickness) + 1
    for (const o of f.offsets) {
      for (let a = 0; a < along; a++) {
        const c0 = Math.round(o + f.slope * a)
        for (let c = c0 - r; c <= c0 + r; c++) if (c >= 0 && c < across) m[horizontal ? c * w + a : a * w + c] = 1
      }
    }
  }
  return m
}

interface InkColours {
  /** Share of the ink's pixels that are clearly coloured. */
  colouredShare: number
  /** Names of the ink's colours (most frequent first), coloured ones only. */
  names: string[]
  /** Mean density direction of each named colour. */
  directions: Rgb[]
  /** Coloured ink that luma would see as nearly paper (light colours such as yellow). */
  lightShare: number
}

/** Darkness (255 · (1 − e^−s)) at the ink level s = 0.35 the colour census counts from. */
const INK_DARKNESS = Math.ceil(255 * (1 - Math.exp(-0.35)))

function inkColours(d: DensityReader, darkness: Uint8Array, n: number, exclude: Uint8Array, paper: PaperColour): InkColours {
  const bins = 12
  const count = new Array<number>(bins).fill(0)
  const sum = Array.from({ length: bins }, () => [0, 0, 0] as Rgb)
  let ink = 0, coloured = 0, light = 0
  for (let i = 0; i < n; i++) {
    if (darkness[i]! < INK_DARKNESS - 1 || exclude[i]) continue
    const v = d.at(i)
    const d0 = v[0]!, d1 = v[1]!, d2 = v[2]!
    const s = Math.max(d0, d1, d2)
    if (s < 0.35) continue
    ink++
    if (chroma(d0, d1, d2) < 0.55) continue
    coloured++
    // luma-like mean density: little for yellow, a lot for black
    if ((d0 + d1 + d2) / 3 < 0.4 * s) light++
    const c = colourOfDensity([d0, d1, d2], paper)
    const hueBin = Math.min(bins - 1, Math.floor((hue(c) / 360) * bins))
    count[hueBin]!++
    sum[hueBin]![0] += d0; sum[hueBin]![1] += d1; sum[hueBin]![2] += d2
  }
  const order = [...count.keys()].filter((b) => count[b]! >= Math.max(20, 0.1 * coloured)).sort((a, b) => count[b]! - count[a]!)
  const names: string[] = []
  const directions: Rgb[] = []
  for (const b of order) {
    const s = sum[b]!
    const len = Math.hypot(...s)
    const dir: Rgb = [s[0] / len, s[1] / len, s[2] / len]
    directions.push(dir)
    const name = colourName(colourOfDensity([s[0] / count[b]!, s[1] / count[b]!, s[2] / count[b]!], paper))
    if (!names.includes(name)) names.push(name)
  }
  return { colouredShare: ink ? coloured / ink : 0, names, directions, lightShare: ink ? light / ink : 0 }
}

function listWords(words: string[]): string {
  return words.length <= 1 ? (words[0] ?? '') : `${words.slice(0, -1).join(', ')} and ${words[words.length - 1]}`
}

function linesWords(families: LineFamily[]): string {
  const h = families.find((f) => f.orientation === 'horizontal')
  const v = families.find((f) => f.orientation === 'vertical')
  if (h && v) return `grid lines (${v.offsets.length} across, ${h.offsets.length} down)`
  const f = (h ?? v)!
  return `${f.orientation === 'horizontal' ? 'ruled' : 'upright'} lines (${f.offsets.length})`
}

/**
 * Lighting evening of one pixel, for every (paper, grey) pair: at (paper << 8) | grey, the grey
 * divided by the paper's brightness, blended by strength. On a prepared grid of millions of
 * pixels a look-up is several times quicker than the division.
 */
export function eveningTable(strength: number): Uint8Array {
  const table = new Uint8Array(65536)
  const keep = 1 - strength
  for (let p = 0; p < 256; p++) {
    for (let g = 0; g < 256; g++) {
      let e = (g * 255) / (p || 1)
      if (e > 255) e = 255
      const v = keep * g + strength * e
      table[(p << 8) | g] = v >= 255 ? 255 : Math.round(v)
    }
  }
  return table
}

/** Evened luma: the image divided by the paper's brightness, blended by strength (as lighting evening). */
export function evenWithMap(grey: Uint8Array, paper: Uint8Array, strength: number): Uint8Array {
  const table = eveningTable(strength)
  const out = new Uint8Array(grey.length)
  for (let i = 0; i < grey.length; i++) out[i] = table[(paper[i]! << 8) | grey[i]!]!
  return out
}

export interface ThresholdFacts {
  /** Otsu's level and separability. */
  otsu: number
  separability: number
  /** Typical paper level and the darkest strokes' level (the ink's 25th percentile). */
  paperLevel: number
  inkCore: number
  /** (paper − ink core) ÷ paper. */
  contrast: number
  /** Share of pixels between the two class means' quarter points. */
  midShare: number
  mean: number
}

export function thresholdFacts(grey: Uint8Array): ThresholdFacts {
  const h = histogram(grey)
  const { threshold: t } = otsuDetails(h)
  let n0 = 0, s0 = 0, n1 = 0, s1 = 0, n = 0, s = 0, ss = 0
  for (let v = 0; v < 256; v++) {
    const c = h[v]!
    n += c; s += v * c; ss += v * v * c
    if (v <= t) { n0 += c; s0 += v * c } else { n1 += c; s1 += v * c }
  }
  const mu0 = n0 ? s0 / n0 : 0, mu1 = n1 ? s1 / n1 : 255
  const mu = n ? s / n : 0
  const varT = n ? ss / n - mu * mu : 0
  const varB = n ? (n0 / n) * (mu0 - mu) ** 2 + (n1 / n) * (mu1 - mu) ** 2 : 0
  let acc = 0, inkCore = mu0
  for (let v = 0; v <= t; v++) { acc += h[v]!; if (acc >= 0.25 * n0) { inkCore = v; break } }
  const lo = mu0 + 0.25 * (mu1 - mu0), hi = mu0 + 0.75 * (mu1 - mu0)
  let mid = 0
  for (let v = Math.ceil(lo); v <= Math.floor(hi); v++) mid += h[v]!
  return {
    otsu: t, separability: varT > 0 ? varB / varT : 1,
    paperLevel: mu1, inkCore, contrast: mu1 > 0 ? (mu1 - inkCore) / mu1 : 0, midShare: n ? mid / n : 0, mean: mu,
  }
}

function thresholdChoice(facts: ThresholdFacts, settings: PipelineSettings): { value: Analysis['threshold'], reason: string } {
  const t = settings.threshold
  const seen = `ink about ${Math.round(facts.inkCore)}, paper about ${Math.round(facts.paperLevel)}`
  if (t.mode !== 'auto') {
    const what = t.mode === 'otsu' ? 'one threshold for the whole sheet (Otsu)'
      : t.mode === 'adaptive' ? `a threshold for every spot from its surroundings (${mm(t.windowMm)} mm window)`
        : `threshold ${t.value}`
    return { value: t, reason: `The grey levels: ${seen}; ${what}, as set.` }
  }
  if (facts.contrast < FAINT_INK) {
    // Where the paper is plain the level is m (1 − k): k = half the contrast puts it half-way
    // between paper and strokes, at a blurred stroke's edge. R, the spread counted as full
    // contrast, is the spread a neighbourhood of paper and these strokes really has (their
    // difference, and a tenth for noise), not the whole 8-bit range: so where strokes crowd
    // together and pull the window's mean down, their spread lifts the level back up.
    const k = Math.round(Math.min(0.3, Math.max(0.05, facts.contrast / 2)) * 100) / 100
    const r = Math.round(Math.min(127.5, Math.max(16, 1.1 * (facts.paperLevel - facts.inkCore))))
    return {
      value: { mode: 'adaptive', windowMm: ADAPTIVE_DEFAULTS.windowMm, k, r },
      reason: `The drawing is faint (its darkest strokes are only ${pct(facts.contrast)} darker than the paper): a threshold for every spot from its surroundings (${ADAPTIVE_DEFAULTS.windowMm} mm window).`,
    }
  }
  return {
    value: { mode: 'otsu' },
    reason: `Ink and paper are clearly apart (${seen}): one threshold for the whole sheet (Otsu), level ${facts.otsu}.`,
  }
}

/** Ink this far inside a shape (from its paper) is a shape's body, not a stroke's edge, mm. */
export const SOLID_DEPTH_MM = 1
/** Share of the bodies of shapes that, turned to paper, means a level hollows them out: our rule of thumb. */
export const HOLLOWED_SHARE = 0.25

/**
 * Whether a level for every spot (Sauvola's) hollows out the solid shapes that one level finds:
 * a window narrower than a filled area sees only ink, so its middle reads as paper. Shapes
 * with bodies (ink more than SOLID_DEPTH_MM from their paper) hold at least 5 % of the ink,
 * and at least HOLLOWED_SHARE of those bodies come out paper. Faint pencil lines have no
 * bodies, and keep the adaptive level they need.
 */
function hollowsShapes(oneLevel: Uint8Array, adaptive: Uint8Array, w: number, h: number, pxPerMm: number): boolean {
  const d2 = squaredDistanceTransform(oneLevel, w, h)
  const depth = Math.max(2, SOLID_DEPTH_MM * pxPerMm)
  const deep2 = depth * depth
  let ink = 0, body = 0, lost = 0
  for (let i = 0; i < oneLevel.length; i++) {
    if (!oneLevel[i]) continue
    ink++
    if (d2[i]! < deep2) continue
    body++
    if (!adaptive[i]) lost++
  }
  return body >= 0.05 * ink && lost >= HOLLOWED_SHARE * body
}

/** The one-level choice for a faint drawing of solid shapes (see hollowsShapes). */
function solidChoice(facts: ThresholdFacts): { value: Analysis['threshold'], reason: string } {
  return {
    value: { mode: 'otsu' },
    reason: `The drawing is faint (its darkest strokes are only ${pct(facts.contrast)} darker than the paper) but its shapes are solid, which a threshold for every spot would hollow out: one threshold for the whole sheet (Otsu), level ${facts.otsu}.`,
  }
}

/** Threshold a grey image by a pinned threshold setting (ink = 1), at pxPerMm for the adaptive window. */
export function applyThreshold(
  grey: Uint8Array, w: number, h: number, t: Analysis['threshold'], pxPerMm: number, hist?: Uint32Array,
): { bitmap: Uint8Array, level: number } {
  // The grey's histogram (given when the caller has it already).
  const otsu = () => otsuDetails(hist ?? histogram(grey)).threshold
  if (t.mode === 'adaptive') {
    return { bitmap: sauvolaBitmap(grey, w, h, { window: windowPx(t.windowMm, pxPerMm), k: t.k, r: t.r }), level: otsu() }
  }
  const level = t.mode === 'manual' ? t.value : otsu()
  const bm = new Uint8Array(grey.length)
  for (let i = 0; i < bm.length; i++) bm[i] = grey[i]! <= level ? 1 : 0
  return { bitmap: bm, level }
}

function pieceFacts(pieces: readonly Piece[], minArea: number, pxPerMm: number, smallPieceMm2: number): { pieces: number, small: number, smallInkShare: number, speckInkShare: number } {
  const weedable = smallPieceMm2 * pxPerMm * pxPerMm // the weeding limit in pixels
  let count = 0, small = 0, area = 0, smallArea = 0, speckArea = 0
  for (const p of pieces) {
    if (p.area < minArea) { speckArea += p.area; continue }
    count++
    area += p.area
    if (p.area < weedable) { small++; smallArea += p.area }
  }
  return { pieces: count, small, smallInkShare: area ? smallArea / area : 0, speckInkShare: area + speckArea ? speckArea / (area + speckArea) : 0 }
}

/** Each pixel's bin of hueSpread's histogram (NO_HUE where too dark to have one), per image. */
const hueBinsOf = new WeakMap<Uint8Array, { key: string, bins: Uint8Array }>()
const NO_HUE = 255

function hueBins(rgb: Uint8Array, paper: PaperColour, standard: PipelineSettings['luma']): Uint8Array {
  const [pr, pg, pb] = paper.ratio
  const key = `${pr} ${pg} ${pb} ${standard}`
  const kept = hueBinsOf.get(rgb)
  if (kept?.key === key) return kept.bins
  const k = LUMA[standard]
  const bins = new Uint8Array(rgb.length / 3)
  for (let i = 0, j = 0; i < bins.length; i++, j += 3) {
    const l = k.r * rgb[j]! + k.g * rgb[j + 1]! + k.b * rgb[j + 2]!
    if (l < 16) { bins[i] = NO_HUE; continue }
    // (a square root of the sum rather than Math.hypot: the same distance, several times quicker)
    const dr = rgb[j]! / l - pr, dg = rgb[j + 1]! / l - pg, db = rgb[j + 2]! / l - pb
    const d = Math.sqrt(dr * dr + dg * dg + db * db)
    bins[i] = Math.min(199, Math.floor(d * 200))
  }
  // Kept with the image: previews of one sheet reading change only the bitmap.
  hueBinsOf.set(rgb, { key, bins })
  return bins
}

function hueSpread(rgb: Uint8Array, bitmap: Uint8Array, paper: PaperColour, standard: PipelineSettings['luma']): number {
  const bins = hueBins(rgb, paper, standard)
  const hist = new Uint32Array(200)
  let n = 0
  for (let i = 0; i < bitmap.length; i++) {
    const b = bins[i]!
    if (bitmap[i] || b === NO_HUE) continue
    hist[b]!++
    n++
  }
  let acc = 0
  for (let b = 0; b < 200; b++) { acc += hist[b]!; if (acc >= 0.75 * n) return b / 200 }
  return 1
}

function inkColourChoice(s: PipelineSettings, colours: InkColours, colourInk: boolean): { reading: 'dark' | 'colour', choice: CleanUpChoice } {
  if (s.inkColour !== 'auto') {
    return {
      reading: s.inkColour,
      choice: { setting: 'inkColour', automatic: false, value: s.inkColour, reason: s.inkColour === 'colour' ? 'Ink is read by its difference from the paper\'s colour, as set.' : 'Ink is read by its grey level, as set.' },
    }
  }
  const reading = colourInk ? 'colour' : 'dark'
  return {
    reading,
    choice: {
      setting: 'inkColour', automatic: true, value: reading,
      reason: colourInk
        ? `Part of the ink is ${listWords(colours.names.slice(0, 3))}${colours.lightShare > 0.05 ? ', close to the paper in brightness' : ''}: ink is read by its difference from the paper's colour.`
        : 'The ink is dark and colourless (pencil, black or dark pen): ink is read by its grey level.',
    },
  }
}

const dot = (a: Rgb, b: Rgb) => a[0] * b[0] + a[1] * b[1] + a[2] * b[2]

/**
 * Colours to read as paper: those of the sheet's lines, when the ink is another colour and
 * keeps most of its strength once they are taken out.
 */
function dropoutChoice(
  s: PipelineSettings, allLines: LineFamily[], lineColours: Rgb[], colours: InkColours, colourInk: boolean, paper: PaperColour,
): { colours: Rgb[], choice: CleanUpChoice } {
  if (s.dropoutColour.mode === 'colours') {
    return { colours: s.dropoutColour.colours.map(fromHex), choice: { setting: 'dropoutColour', automatic: false, value: s.dropoutColour, reason: `${listWords(s.dropoutColour.colours)} read as paper, as set.` } }
  }
  if (s.dropoutColour.mode === 'none') {
    return { colours: [], choice: { setting: 'dropoutColour', automatic: false, value: s.dropoutColour, reason: 'No colour is dropped, as set.' } }
  }
  const candidates: { colour: Rgb, dir: Rgb, name: string }[] = []
  // The ink's own colours (grey ink: equal in every channel) must keep most of their
  // strength once the dropped colours are taken out, or the drawing would go with them.
  const grey = 1 / Math.sqrt(3)
  const inkDirs: Rgb[] = colourInk ? colours.directions : [[grey, grey, grey]]
  const keeps = (drops: Rgb[]) => {
    const basis = orthonormal(drops)
    return inkDirs.every((u) => {
      const v: Rgb = [...u]
      for (const b of basis) {
        const a = dot(v, b)
        if (a > 0) { v[0] -= a * b[0]; v[1] -= a * b[1]; v[2] -= a * b[2] }
      }
      return Math.max(...v) >= 0.4 * Math.max(...u)
    })
  }
  // Regular families first: they are the sheet's lines for sure.
  const order = allLines.map((_, i) => i).sort((a, b) => Number(allLines[b]!.regular) - Number(allLines[a]!.regular))
  for (const i of order) {
    const dens = lineColours[i]!
    if (chroma(...dens) < 0.4) continue
    const colour = colourOfDensity(dens, paper)
    const dir = densityDirection(colour, paper)
    if (!dir) continue
    if (colours.directions.some((u) => dot(u, dir) > 0.93)) continue // the ink itself is that colour
    if (candidates.some((c) => dot(c.dir, dir) > 0.97)) continue
    if (!keeps([...candidates.map((c) => c.dir), dir])) continue
    candidates.push({ colour, dir, name: colourName(colour) })
  }
  if (candidates.length) {
    return {
      colours: candidates.map((c) => c.colour),
      choice: { setting: 'dropoutColour', automatic: true, value: { mode: 'colours', colours: candidates.map((c) => toHex(c.colour)) }, reason: `The sheet's lines are ${listWords(candidates.map((c) => c.name))} and the drawing is not: that colour is read as paper.` },
    }
  }
  const coloured = lineColours.some((c) => chroma(...c) >= 0.4)
  return {
    colours: [],
    choice: { setting: 'dropoutColour', automatic: true, value: { mode: 'none' }, reason: coloured ? 'The sheet\'s lines are the same colour as the drawing: no colour can be dropped.' : 'No coloured lines on the sheet: no colour is dropped.' },
  }
}

function paperLinesChoice(s: PipelineSettings, lines: LineFamily[], remove: boolean): CleanUpChoice {
  const value = remove ? 'remove' : 'keep'
  if (s.paperLines !== 'auto') {
    return {
      setting: 'paperLines', automatic: false, value,
      reason: remove ? `${lines.length ? `The sheet has ${linesWords(lines)}: they` : 'Ruled or grid lines'} are taken out, as set.` : 'Ruled and grid lines are kept, as set.',
    }
  }
  return {
    setting: 'paperLines', automatic: true, value,
    reason: lines.length ? `The sheet has evenly spaced ${linesWords(lines)}: they are taken out, keeping the strokes that cross them.` : 'No ruled or grid lines were found.',
  }
}

/**
 * The sheet squared from its corners (pixels of the source as cropped), for a camera whose
 * principal point and photo's long side are given: the one straightening every path uses (the
 * colour layers' too, colour/straighten.ts), so all read the same frame.
 */
export function squaredSheet(q: Quad, principal: { x: number, y: number }, photoLongSide: number): { width: number, height: number, toSource: Frame['toSource'] } {
  return fromSheet(sheetFrame(q, principal.x, principal.y, photoLongSide, SHEET_INSET))
}

function frameFor(input: AnalysisInput, luma: Uint8Array): { frame: Frame, choice: CleanUpChoice } {
  const s = input.settings
  const c = s.corners
  let base: { width: number, height: number, toSource: Frame['toSource'] } = sourceFrame(input.sourceWidth, input.sourceHeight)
  let choice: CleanUpChoice
  const straighten = (q: Quad) => squaredSheet(q, input.principal, input.photoLongSide)
  const onWhole = (q: Quad) => q.map((p) => ({ x: p.x + input.cropOffset.x, y: p.y + input.cropOffset.y })) as Quad
  if (c.mode === 'manual') {
    const q = c.points.map((p) => ({ x: p.x - input.cropOffset.x, y: p.y - input.cropOffset.y })) as Quad
    base = straighten(q)
    choice = { setting: 'corners', automatic: false, value: c, reason: 'Straightened from the corners as set.' }
  } else if (c.mode === 'off') {
    choice = { setting: 'corners', automatic: false, value: c, reason: 'Taken as it is, without straightening, as set.' }
  } else {
    const found = findSheet(luma, input.width, input.height)
    if (found) {
      // As reported (to a tenth of a pixel, on the upright source), so that pinning the reported
      // corners gives the same result; a corner found just off the picture is put on its edge.
      const round = (v: number, max: number) => Math.min(max, Math.max(0, Math.round(v * 10) / 10))
      const points = onWhole(found.corners.map((p) => ({ x: p.x / input.scale, y: p.y / input.scale })) as Quad)
        .map((p) => ({ x: round(p.x, input.uprightWidth), y: round(p.y, input.uprightHeight) })) as Quad
      const q = points.map((p) => ({ x: p.x - input.cropOffset.x, y: p.y - input.cropOffset.y })) as Quad
      base = straighten(q)
      const angled = skewOf(q)
      choice = {
        setting: 'corners', automatic: true, value: { mode: 'manual', points },
        reason: angled > 1.5
          ? `The sheet was photographed at an angle: straightened from its four corners (${pct(found.coverage)} of the picture).`
          : `The sheet's four corners are in the picture: the sheet is cut out and squared (${pct(found.coverage)} of the picture).`,
      }
    } else {
      choice = { setting: 'corners', automatic: true, value: { mode: 'off' }, reason: 'No sheet with four visible corners (a scan, or paper filling the picture): taken as it is.' }
    }
  }
  return { frame: turnFrame(base, s.quarterTurns, s.fineAngleDeg), choice }
}

/** Largest departure of the quadrilateral's corners from right angles, degrees. */
function skewOf(q: Quad): number {
  let worst = 0
  for (let i = 0; i < 4; i++) {
    const a = q[(i + 3) % 4]!, p = q[i]!, b = q[(i + 1) % 4]!
    const v1 = { x: a.x - p.x, y: a.y - p.y }, v2 = { x: b.x - p.x, y: b.y - p.y }
    const cos = (v1.x * v2.x + v1.y * v2.y) / (Math.hypot(v1.x, v1.y) * Math.hypot(v2.x, v2.y))
    worst = Math.max(worst, Math.abs((Math.acos(Math.max(-1, Math.min(1, cos))) * 180) / Math.PI - 90))
  }
  return worst
}

/**
 * The part of the analysis that does not depend on the threshold, the swap, the speck filter or
 * the size: the frame, the paper, the lighting, lines, ink colour and dropout, and the grey
 * reading the threshold will see. The tuning bench moves the threshold and the outline's
 * settings far more often than anything here, so a preview can keep this and start from it
 * (see readingKey).
 */
export interface SheetReading {
  frame: Frame
  /** The analysis frame (R′G′B′), its size, and analysis pixels per frame pixel. */
  rgb: Uint8Array
  width: number
  height: number
  scale: number
  paper: PaperColour
  paperMap: Uint8Array
  lighting: LightingChoice
  reading: Analysis['reading']
  dropped: Rgb[]
  lines: LineFamily[]
  removeLines: boolean
  grey: Uint8Array
  facts: ThresholdFacts
  choices: CleanUpChoice[]
  timings: Pick<Analysis['timings'], 'sheet' | 'frame' | 'paper' | 'lines' | 'colours'>
}

/** The settings a SheetReading depends on (with the source and its crop), as a key. */
export function readingKey(s: PipelineSettings): string {
  return JSON.stringify([s.luma, s.corners, s.quarterTurns, s.fineAngleDeg, s.crop, s.lightingEvening, s.inkColour, s.dropoutColour, s.paperLines, s.swapInkAndPaper])
}

export async function readSheet(input: AnalysisInput): Promise<SheetReading> {
  const s = input.settings
  const choices: CleanUpChoice[] = []
  let last = performance.now()
  const lap = () => { const now = performance.now(), d = now - last; last = now; return d }
  const luma0 = toGrey(input.rgb, input.width, input.height, 3, s.luma)
  const { frame, choice: cornersChoice } = frameFor(input, luma0)
  choices.push(cornersChoice)
  const tSheet = lap()

  // The analysis frame: the frame at the analysis copy's scale.
  let rgb = input.rgb, w = input.width, h = input.height
  const scale = input.scale
  if (!frame.identity) {
    w = Math.max(1, Math.round(frame.width * scale))
    h = Math.max(1, Math.round(frame.height * scale))
    const outToIn = multiply(scaling(scale), multiply(frame.toSource, scaling((frame.width / w), (frame.height / h))))
    const paperGuess = estimatePaperColour(input.rgb, input.width * input.height, s.luma, luma0)
    const toBase = multiply(frame.base.toBase, scaling(frame.width / w, frame.height / h))
    rgb = warpBilinear(input.rgb, input.width, input.height, 3, outToIn, w, h, paperGuess.rgb.map(Math.round), { map: toBase, width: frame.base.width, height: frame.base.height })
  }
  const n = w * h
  const luma = frame.identity ? luma0 : toGrey(rgb, w, h, 3, s.luma)
  const tFrame = lap()
  const paper = estimatePaperColour(rgb, n, s.luma, luma)
  const paperMap = await paperEstimate(luma, w, h)

  const lighting = lightingChoice(luma, paperMap, w, h, s)
  choices.push({ setting: 'lightingEvening', automatic: s.lightingEvening.mode === 'auto', value: { mode: lighting.choice.on ? 'on' : 'off', strength: lighting.choice.strength }, reason: lighting.reason })

  // Darkness against the local paper, every colour counted: for finding lines and ink colours.
  const d = densityReader(rgb, paper, paperMap)
  const darkness = densityGrey(rgb, n, { paper, paperLuma: paperMap, dropped: [] })
  for (let i = 0; i < n; i++) darkness[i] = 255 - darkness[i]!
  const tPaper = lap()
  const allLines = s.paperLines === 'keep' && s.dropoutColour.mode !== 'auto' ? [] : findPaperLines(darkness, w, h)
  const lines = allLines.filter((f) => f.regular)
  const tLines = lap()
  const lineColours = allLines.map((f) => lineDensity(d, w, h, f))
  const colours = inkColours(d, darkness, n, lineMask(w, h, allLines), paper)

  const colourInk = colours.colouredShare >= 0.1
  const ink = inkColourChoice(s, colours, colourInk)
  choices.push(ink.choice)
  const reading = ink.reading

  const drop = dropoutChoice(s, allLines, lineColours, colours, colourInk, paper)
  choices.push(drop.choice)
  const droppedColours = drop.colours
  const droppedDirs = droppedColours.map((c) => densityDirection(c, paper)).filter((v): v is Rgb => v !== null)
  const dropped = orthonormal(droppedDirs)
  // Lines of a dropped colour are gone from the grey reading: nothing left to take out by shape.
  allLines.forEach((f, i) => {
    const dir = densityDirection(colourOfDensity(lineColours[i]!, paper), paper)
    f.dropped = !!dir && droppedDirs.some((u) => dot(u, dir) > 0.97)
  })

  const removeFound = s.paperLines === 'remove' || (s.paperLines === 'auto' && lines.length > 0)
  choices.push(paperLinesChoice(s, lines, removeFound))

  // The grey reading the threshold will see.
  const evened = lighting.choice.on ? lighting.choice.strength : 0
  const useDensity = reading === 'colour' || dropped.length > 0
  const grey = useDensity
    ? densityGrey(rgb, n, { paper, paperLuma: evened > 0 ? paperMap : null, dropped, strength: evened })
    : evened > 0 ? evenWithMap(luma, paperMap, evened) : luma
  const facts = thresholdFacts(grey)
  return {
    frame, rgb, width: w, height: h, scale: w / frame.width, paper, paperMap, lighting: lighting.choice,
    reading: useDensity ? 'density' : 'luma', dropped, lines, removeLines: removeFound, grey, facts, choices,
    timings: { sheet: tSheet, frame: tFrame, paper: tPaper, lines: tLines, colours: lap() },
  }
}

/**
 * The rest of the analysis on a sheet's reading (which it does not change): the threshold
 * method, the analysis frame cleaned up as the full one will be, the drawing's extent and the
 * facts for the checks that this is a drawing at all.
 */
export function finishAnalysis(r: SheetReading, input: Pick<AnalysisInput, 'settings' | 'widthOf' | 'widthMm' | 'smallPieceMm2'>): Analysis {
  const s = input.settings
  const t0 = performance.now()
  const { width: w, height: h, grey, facts, frame } = r
  const n = w * h
  let threshold = thresholdChoice(facts, s)

  // The analysis frame cleaned up as the full one will be.
  let pxPerMm = w / input.widthMm
  let oneLevel: Uint8Array | null = null
  if (threshold.value.mode === 'adaptive') {
    // A look with one level: for the drawing's extent (the adaptive window's size in pixels),
    // and to see what the adaptive level does to the shapes.
    oneLevel = applyThreshold(grey, w, h, { mode: 'otsu' }, 1).bitmap
    if (s.swapInkAndPaper) for (let i = 0; i < n; i++) oneLevel[i] = 1 - oneLevel[i]!
    if (input.widthOf === 'drawing') {
      const box = inkBox(piecesOf(oneLevel, w, h), Math.max(2, 1e-5 * n))
      pxPerMm = box ? (box.x1 - box.x0 + 1) / input.widthMm : w / input.widthMm
    }
  }
  let { bitmap } = applyThreshold(grey, w, h, threshold.value, pxPerMm)
  if (s.swapInkAndPaper) for (let i = 0; i < n; i++) bitmap[i] = 1 - bitmap[i]!
  if (s.threshold.mode === 'auto' && oneLevel && hollowsShapes(oneLevel, bitmap, w, h, pxPerMm)) {
    threshold = solidChoice(facts)
    bitmap = oneLevel
  }
  if (r.removeLines) for (const f of r.lines) if (!f.dropped) removeLines(bitmap, w, h, f)
  const t1 = performance.now()
  let inkPixels = 0
  for (let i = 0; i < n; i++) inkPixels += bitmap[i]!
  const choices = [...r.choices, { setting: 'threshold', automatic: s.threshold.mode === 'auto', value: threshold.value, reason: threshold.reason } satisfies CleanUpChoice]
  const found = { pieces: piecesOf(bitmap, w, h) }
  let box: Box | null = null
  for (let round = 0; round < 2; round++) {
    const speck = Math.max(1, s.speckFilterMm2 * pxPerMm * pxPerMm)
    box = inkBox(found.pieces, speck)
    if (!box || input.widthOf === 'frame') break
    pxPerMm = (box.x1 - box.x0 + 1) / input.widthMm
  }
  const pf = pieceFacts(found.pieces, Math.max(1, s.speckFilterMm2 * pxPerMm * pxPerMm), pxPerMm, input.smallPieceMm2 ?? 1)
  const paperHueSpread = hueSpread(r.rgb, bitmap, r.paper, s.luma)
  const sx = w / frame.width, sy = h / frame.height
  const inkExtent = box ? { x0: box.x0 / sx, y0: box.y0 / sy, x1: (box.x1 + 1) / sx, y1: (box.y1 + 1) / sy } : null
  return {
    frame, scale: r.scale, width: w, height: h, paper: r.paper, paperMap: r.paperMap,
    lighting: r.lighting, reading: r.reading, dropped: r.dropped, lines: r.lines, removeLines: r.removeLines,
    threshold: threshold.value, ink: inkExtent, pxPerMm, choices,
    facts: {
      inkShare: inkPixels / n, contrastLevels: facts.paperLevel - facts.inkCore, meanGrey: facts.mean, midShare: facts.midShare, separability: facts.separability,
      pieces: pf.pieces, smallPieces: pf.small, smallInkShare: pf.smallInkShare, speckInkShare: pf.speckInkShare, paperHueSpread,
    },
    timings: { ...r.timings, threshold: t1 - t0, pieces: performance.now() - t1 },
  }
}

export async function analyse(input: AnalysisInput): Promise<Analysis> {
  return finishAnalysis(await readSheet(input), input)
}
