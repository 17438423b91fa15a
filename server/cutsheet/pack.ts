// eslint-disable-next-line @typescript-eslint/triple-slash-reference -- the ESM build's ambient types must reach every project that compiles this file
/// <reference path="./maxrects-packer.d.ts" />
// Packing a batch: the copies of several designs on as many sheets of one film as they need.
//
// Each copy takes a slot: its box (the drawn box grown by half the kerf), the weeding frame
// around it when there is one, and a strip below for its label when labels are written as
// text. Slots nest by their rectangles, with the gap between neighbouring slots and the
// margin along every edge of the sheet, each turned 90° where that packs better.
//
// Two ways are tried and the better kept (fewer sheets, then fuller early sheets; on a tie
// the grid, which the operator finds easier to check by eye):
//  - for a single design, the grid of shared/utils/sheet-layout.ts (rows and columns, both
//    orientations), so a one-job sheet never holds fewer copies than the grid;
//  - the maxrects-packer library's MaxRects bin packer, with rotation, on whole hundredths of
//    a millimetre (its padding is our gap and its border our margin: it keeps `padding`
//    between placed rectangles and `border` from the bin's edges), in a few of its
//    heuristics.
//
// Slot layout, before turning (x right, y down, relative to the slot's top-left corner):
//   frame  0 … bw + 2o  ×  0 … bh + 2o            (only with a weeding frame; o its offset)
//   box    o … o + bw   ×  o … o + bh             (bw × bh: the design's box)
//   label  0 … labelWidth × bh + 2o + labelGap … + labelHeight   (text labels only)
// A turned slot is the same turned 90° clockwise, as a turned copy is (see place.ts).
// The ESM build itself (see maxrects-packer.d.ts beside this file for why).
import { MaxRectsPacker, PACKING_LOGIC } from 'maxrects-packer/dist/maxrects-packer.mjs'
import { layoutSheets } from '../../shared/utils/sheet-layout'
import { checkDesignId, checkKerf, positiveMm } from './design'
import type { Rect } from './place'

export type LabelMode = 'text' | 'ids'

export interface LabelOptions {
  /** 'text': each copy's id written outside its outline; 'ids': only as ids on the SVG groups. */
  mode: LabelMode
  /** Cap height of the label text, mm (default 2.5). */
  heightMm?: number
  /** Film between the copy's box (or its frame) and its label, mm (default 1). */
  gapMm?: number
}

export interface PackDesign {
  /** See design.ts: letters, digits, '_', '.', '-'. */
  id: string
  /** The drawn box at placed size, mm. */
  widthMm: number
  heightMm: number
  /** Copies of this design, a whole number ≥ 1. */
  count: number
  /** One label per copy (e.g. "J12-3"), unique over the batch; default `${id}-${n}`. */
  labels?: string[]
  /**
   * The design's box in its own coordinates, when its cut path reaches past the drawn box
   * grown by half the kerf (prepareDesign works it out); default −kerf/2 … size + kerf/2.
   */
  extentMm?: { x0: number, y0: number, x1: number, y1: number }
}

export interface PackInput {
  designs: PackDesign[]
  sheetWidthMm: number
  sheetHeightMm: number
  /** Film between neighbouring slots, mm. */
  gapMm: number
  /** Film kept free along every edge, mm. */
  marginMm: number
  /** May copies be turned 90°? Default true. */
  allowTurn?: boolean
  /** Kerf, mm (0: off). The box grows by half of it on every side. */
  kerfMm?: number
  /** Weeding frame offset from each copy's box, mm, or null/0 for none. */
  weedingFrameMm?: number | null
  labels?: LabelOptions
}

export interface PackedCopy {
  designId: string
  label: string
  /** Sheet number, from 1. */
  sheet: number
  turned: boolean
  /** The slot on the sheet (after turning), mm. */
  slot: Rect
  /** The copy's box on the sheet, mm. */
  box: Rect
  frame: Rect | null
  /** Where the label text sits (text labels only), mm. */
  labelBox: Rect | null
}

export interface SheetUsage {
  sheet: number
  copies: number
  /** Drawn-box area of its copies ÷ sheet area × 100. */
  usagePercent: number
}

export interface PackResult {
  fits: boolean
  /** Why not (only when fits is false). */
  reason?: string
  method: 'grid' | 'packer'
  sheets: number
  copies: PackedCopy[]
  perSheet: SheetUsage[]
  /** Over all sheets used. */
  usagePercent: number
}

/** Label text: cap height (mm) to font size, and the advance of one character, for a monospaced face. */
export const LABEL_DEFAULT_HEIGHT_MM = 2.5
export const LABEL_DEFAULT_GAP_MM = 1
/** Cap height ≈ 0.7 em and advance 0.6 em in common monospaced faces (from memory). */
export const CAP_HEIGHT_EM = 0.7
export const ADVANCE_EM = 0.6
/** Room kept below the baseline for descenders, in cap heights (about 0.2 em: from memory). */
export const DESCENT_CAPS = 0.3

/** Millimetres to whole hundredths, rounded up (sizes, gaps, margins) or down (the sheet). */
const up = (v: number) => Math.ceil(v * 100 - 1e-6)
const down = (v: number) => Math.floor(v * 100 + 1e-6)

const LABEL_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.-]{0,23}$/
const MAX_BATCH_COPIES = 10_000

export function labelWidthMm(text: string, capHeightMm: number): number {
  return text.length * ADVANCE_EM * (capHeightMm / CAP_HEIGHT_EM)
}

export function checkLabel(label: unknown): string {
  if (typeof label !== 'string' || !LABEL_PATTERN.test(label)) {
    throw new RangeError(`A copy label must be 1–24 letters, digits, '_', '.' or '-', starting with a letter or digit (got ${JSON.stringify(label)}).`)
  }
  return label
}

interface SlotSpec {
  designId: string
  /** Width × height as drawn, for film usage. */
  drawnArea: number
  boxW: number
  boxH: number
  frame: number
  labels: string[]
  labelWidth: number
  width: number
  height: number
}

interface Settings {
  W: number
  H: number
  gap: number
  margin: number
  allowTurn: boolean
  kerf: number
  frame: number
  labelMode: LabelMode
  labelHeight: number
  labelGap: number
}

function settingsOf(input: PackInput): Settings {
  const W = positiveMm('The sheet width', input.sheetWidthMm)
  const H = positiveMm('The sheet height', input.sheetHeightMm)
  const nonNegative = (name: string, v: unknown) => {
    if (typeof v !== 'number' || !Number.isFinite(v) || v < 0) throw new RangeError(`${name} must be zero or a positive number of millimetres (got ${String(v)}).`)
    return v
  }
  // On the 0.01 mm grid of the files, rounded up so that neither ever shrinks.
  const gap = up(nonNegative('The gap', input.gapMm)) / 100
  const margin = up(nonNegative('The margin', input.marginMm)) / 100
  const frame = nonNegative("The weeding frame's offset", input.weedingFrameMm ?? 0)
  const allowTurn = input.allowTurn ?? true
  if (typeof allowTurn !== 'boolean') throw new RangeError('allowTurn must be true or false.')
  const labels = input.labels ?? { mode: 'ids' }
  if (labels.mode !== 'text' && labels.mode !== 'ids') throw new RangeError(`The label mode must be 'text' or 'ids' (got ${String(labels.mode)}).`)
  return {
    W, H, gap, margin, allowTurn, frame,
    kerf: checkKerf(input.kerfMm ?? 0),
    labelMode: labels.mode,
    labelHeight: positiveMm('The label height', labels.heightMm ?? LABEL_DEFAULT_HEIGHT_MM),
    labelGap: nonNegative("The label's distance from its copy", labels.gapMm ?? LABEL_DEFAULT_GAP_MM),
  }
}

function slotSpecs(input: PackInput, s: Settings): SlotSpec[] {
  if (!Array.isArray(input.designs) || input.designs.length === 0) throw new RangeError('A batch needs at least one design.')
  const ids = new Set<string>()
  const seen = new Set<string>()
  let total = 0
  return input.designs.map((d) => {
    const id = checkDesignId(d.id)
    if (ids.has(id)) throw new RangeError(`Design id ${id} appears twice in the batch.`)
    ids.add(id)
    if (typeof d.count !== 'number' || !Number.isInteger(d.count) || d.count < 1) {
      throw new RangeError(`Design ${id}: the number of copies must be a whole number of at least 1 (got ${String(d.count)}).`)
    }
    total += d.count
    if (total > MAX_BATCH_COPIES) throw new RangeError(`At most ${MAX_BATCH_COPIES} copies can be packed at once.`)
    const labels = d.labels ?? Array.from({ length: d.count }, (_, i) => `${id}-${i + 1}`)
    if (labels.length !== d.count) throw new RangeError(`Design ${id} has ${d.count} copies but ${labels.length} labels.`)
    for (const l of labels) {
      checkLabel(l)
      if (seen.has(l)) throw new RangeError(`The label ${l} is given to two copies; labels must tell copies apart.`)
      seen.add(l)
    }
    const w = positiveMm(`Design ${id}'s width`, d.widthMm), h = positiveMm(`Design ${id}'s height`, d.heightMm)
    const e = d.extentMm
    const boxW = e ? Math.max(e.x1 - e.x0, w + s.kerf) : w + s.kerf
    const boxH = e ? Math.max(e.y1 - e.y0, h + s.kerf) : h + s.kerf
    const text = s.labelMode === 'text'
    const labelWidth = text ? Math.max(...labels.map((l) => labelWidthMm(l, s.labelHeight))) : 0
    // Slots are whole hundredths of a millimetre (rounded up), so every placement, and every
    // copy's transform, lands on the 0.01 mm grid of the files without moving.
    return {
      designId: id, drawnArea: w * h, boxW, boxH, frame: s.frame, labels, labelWidth,
      width: up(Math.max(boxW + 2 * s.frame, labelWidth)) / 100,
      height: up(boxH + 2 * s.frame + (text ? s.labelGap + s.labelHeight * (1 + DESCENT_CAPS) : 0)) / 100,
    }
  })
}

interface SlotPlacement { spec: SlotSpec, index: number, sheet: number, x: number, y: number, turned: boolean }

/** Rectangle (x0, y0)–(x1, y1) of the slot-local rect r, turned clockwise within a slot of height sh when turned, then moved. */
function onSheet(r: Rect, p: SlotPlacement): Rect {
  if (!p.turned) return { x: p.x + r.x, y: p.y + r.y, width: r.width, height: r.height }
  // (x, y) → (sh − y, x): the rect's y-span becomes an x-span from the right.
  const sh = p.spec.height
  return { x: p.x + sh - (r.y + r.height), y: p.y + r.x, width: r.height, height: r.width }
}

function describe(p: SlotPlacement, s: Settings): PackedCopy {
  const { spec } = p
  const o = spec.frame
  const slotRect: Rect = { x: 0, y: 0, width: spec.width, height: spec.height }
  const label = spec.labels[p.index]!
  return {
    designId: spec.designId, label, sheet: p.sheet, turned: p.turned,
    slot: onSheet(slotRect, p),
    box: onSheet({ x: o, y: o, width: spec.boxW, height: spec.boxH }, p),
    frame: o > 0 ? onSheet({ x: 0, y: 0, width: spec.boxW + 2 * o, height: spec.boxH + 2 * o }, p) : null,
    labelBox: s.labelMode === 'text'
      ? onSheet({ x: 0, y: spec.boxH + 2 * o + s.labelGap, width: labelWidthMm(label, s.labelHeight), height: s.labelHeight * (1 + DESCENT_CAPS) }, p)
      : null,
  }
}

function gridPlacements(spec: SlotSpec, s: Settings): SlotPlacement[] | null {
  const layout = layoutSheets({
    copyWidthMm: spec.width, copyHeightMm: spec.height, copies: spec.labels.length,
    sheetWidthMm: s.W, sheetHeightMm: s.H, gapMm: s.gap, marginMm: s.margin, allowTurn: s.allowTurn,
  })
  if (!layout.fits) return null
  // Sums of hundredths: round away the floating-point dust.
  return layout.placements.map((p, index) => ({ spec, index, sheet: p.sheet, x: Math.round(p.x * 100) / 100, y: Math.round(p.y * 100) / 100, turned: p.turned }))
}

interface PackerItem { spec: SlotSpec, index: number }

function packerPlacements(specs: SlotSpec[], s: Settings, logic: PACKING_LOGIC, smart: boolean): SlotPlacement[] {
  const packer = new MaxRectsPacker(down(s.W), down(s.H), up(s.gap), {
    smart, pot: false, square: false, allowRotation: s.allowTurn, border: up(s.margin), logic,
  })
  const rects = specs.flatMap((spec) => spec.labels.map((_, index) => ({ spec, index })))
  for (const item of rects) packer.add(up(item.spec.width), up(item.spec.height), item)
  const out: SlotPlacement[] = []
  packer.bins.forEach((bin, b) => {
    for (const r of bin.rects) {
      const item = r.data as PackerItem
      out.push({ spec: item.spec, index: item.index, sheet: b + 1, x: r.x / 100, y: r.y / 100, turned: !!r.rot })
    }
  })
  return out
}

/** Copies on each sheet, for comparing two packings. */
function counts(ps: SlotPlacement[]): number[] {
  const c: number[] = []
  for (const p of ps) c[p.sheet - 1] = (c[p.sheet - 1] ?? 0) + 1
  return c
}

/** Negative when a is the better packing: fewer sheets, then more copies on earlier sheets. */
function compare(a: SlotPlacement[], b: SlotPlacement[]): number {
  const ca = counts(a), cb = counts(b)
  if (ca.length !== cb.length) return ca.length - cb.length
  for (let i = 0; i < ca.length; i++) if (ca[i] !== cb[i]) return cb[i]! - ca[i]!
  return 0
}

function fitsOnSheet(spec: SlotSpec, s: Settings, turned: boolean): boolean {
  const w = turned ? spec.height : spec.width, h = turned ? spec.width : spec.height
  return up(w) <= down(s.W) - 2 * up(s.margin) && up(h) <= down(s.H) - 2 * up(s.margin)
}

const mm = (v: number) => `${Math.round(v * 100) / 100}`

/** Packs the batch's copies onto sheets. Never throws for "does not fit": says so in `reason`. */
export function packBatch(input: PackInput): PackResult {
  const s = settingsOf(input)
  const specs = slotSpecs(input, s)
  const misfit = specs.find((spec) => !fitsOnSheet(spec, s, false) && !(s.allowTurn && fitsOnSheet(spec, s, true)))
  if (misfit) {
    const extra = [s.frame > 0 ? 'weeding frame' : null, s.labelMode === 'text' ? 'label' : null, s.kerf > 0 ? 'kerf' : null].filter(Boolean)
    const turnable = !s.allowTurn && fitsOnSheet(misfit, s, true)
    return {
      fits: false, method: 'packer', sheets: 0, copies: [], perSheet: [], usagePercent: 0,
      reason: `Design ${misfit.designId} (${mm(misfit.width)} × ${mm(misfit.height)} mm${extra.length ? ` with its ${extra.join(', ')}` : ''}) does not fit on a ${mm(s.W)} × ${mm(s.H)} mm sheet with a ${mm(s.margin)} mm margin${turnable ? '; it would fit turned 90°, but turning is off' : s.allowTurn ? ', not even turned 90°' : ''}.`,
    }
  }
  const candidates: { method: 'grid' | 'packer', placements: SlotPlacement[] }[] = []
  if (specs.length === 1) {
    const grid = gridPlacements(specs[0]!, s)
    if (grid) candidates.push({ method: 'grid', placements: grid })
  }
  for (const logic of [PACKING_LOGIC.MAX_EDGE, PACKING_LOGIC.MAX_AREA]) {
    for (const smart of [true, false]) candidates.push({ method: 'packer', placements: packerPlacements(specs, s, logic, smart) })
  }
  // Stable: the first of equals wins, so the grid wins ties.
  const best = candidates.reduce((a, b) => (compare(b.placements, a.placements) < 0 ? b : a))
  const placements = [...best.placements].sort((a, b) => a.sheet - b.sheet || a.y - b.y || a.x - b.x)
  const copies = placements.map((p) => describe(p, s))
  const sheets = counts(placements).length
  const area = (ps: SlotPlacement[]) => ps.reduce((a, p) => a + p.spec.drawnArea, 0)
  const perSheet: SheetUsage[] = []
  for (let n = 1; n <= sheets; n++) {
    const on = placements.filter((p) => p.sheet === n)
    perSheet.push({ sheet: n, copies: on.length, usagePercent: area(on) / (s.W * s.H) * 100 })
  }
  const usagePercent = area(placements) / (sheets * s.W * s.H) * 100
  return { fits: true, method: best.method, sheets, copies, perSheet, usagePercent }
}
