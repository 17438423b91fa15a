// A test grid for a film: small squares, each to be cut at its own power and speed, so the
// operator can see which weeds cleanly and record that as the film's laser settings.
//
// Rows are power steps (lettered A, B, C …, lowest power at the top), columns speed steps
// (numbered 1, 2, 3 …, slowest on the left); each square is labelled by its position ("B3")
// just below it. A legend is drawn as text: a title line, each column's speed above it and
// each row's power left of it. The laser settings themselves cannot travel in an SVG or DXF in
// any way every laser program reads, so the files carry positions and the legend, and
// testGrid also returns every square's power and speed for the page to show as a table.
//
// The squares are one design placed 20-odd times, so the files are written exactly as a cut
// sheet's are (svg.ts, dxf.ts): one <defs> path and <use> per square; DXF R12 polylines; the
// text in its own group and layer, to be marked, or switched off.
import { prepareDesign } from './design'
import { writeSheetDxf } from './dxf'
import { DESCENT_CAPS, LABEL_DEFAULT_GAP_MM, LABEL_DEFAULT_HEIGHT_MM, labelWidthMm } from './pack'
import type { CutCurve } from './path'
import type { Rect } from './place'
import type { PlanCopy, PlanText, SheetPlan } from './plan'
import { boxTransform } from './sheet'
import { HAIRLINE_MM, writeSheetSvg } from './svg'

export interface SettingRange {
  /** First value (top row / left column). */
  from: number
  /** Last value; equal to `from` when steps is 1. */
  to: number
  /** How many values, evenly spaced from `from` to `to` inclusive. */
  steps: number
}

export interface TestGridInput {
  /** Laser power, percent of the machine's maximum: one row per step (at most 26). */
  power: SettingRange
  /** Speed, mm/s: one column per step (at most 20). */
  speed: SettingRange
  /** Side of each square, mm (default 10). */
  squareMm?: number
  /** Film between neighbouring cells (square and its label), mm (default 4). */
  gapMm?: number
  /** Film kept free along every edge, mm (default 5). */
  marginMm?: number
  /** Cap height of all text, mm (default 2.5). */
  textHeightMm?: number
  /** Kerf, mm (default 0: a test grid usually serves to measure it). */
  kerfMm?: number
  mirror?: boolean
  strokeMm?: number
  /** The film's sheet, when known: the grid must fit on it. */
  sheetWidthMm?: number
  sheetHeightMm?: number
}

export interface TestSquare {
  /** Position label, row letter then column number: "A1". */
  label: string
  /** From 0, top to bottom. */
  row: number
  /** From 0, left to right. */
  column: number
  powerPercent: number
  speedMmS: number
  /** The square as drawn on the grid's page, mm, y down. */
  box: Rect
}

export interface TestGrid {
  widthMm: number
  heightMm: number
  squares: TestSquare[]
  rows: { letter: string, powerPercent: number }[]
  columns: { number: number, speedMmS: number }[]
  svg: string
  dxf: string
}

const MAX_ROWS = 26
const MAX_COLUMNS = 20
const LINE_PITCH_CAPS = 1.6

/** The values of a range, evenly spaced, to 0.1. */
export function rangeValues(name: string, r: SettingRange, limits: { min: number, max: number, maxSteps: number, unit: string }): number[] {
  const { from, to, steps } = r ?? ({} as SettingRange)
  if (typeof steps !== 'number' || !Number.isInteger(steps) || steps < 1 || steps > limits.maxSteps) {
    throw new RangeError(`The ${name} needs 1 to ${limits.maxSteps} steps (got ${String(steps)}).`)
  }
  for (const v of [from, to]) {
    if (typeof v !== 'number' || !Number.isFinite(v) || v <= limits.min || v > limits.max) {
      throw new RangeError(`The ${name} must be more than ${limits.min} and at most ${limits.max} ${limits.unit} (got ${String(v)}).`)
    }
  }
  if (steps === 1 && from !== to) throw new RangeError(`One ${name} step needs the same first and last value.`)
  return Array.from({ length: steps }, (_, i) => Math.round((steps === 1 ? from : from + ((to - from) * i) / (steps - 1)) * 10) / 10)
}

const text = (id: string, value: string, x: number, y: number, capHeightMm: number): PlanText => ({
  id, text: value, x, y, capHeightMm, widthMm: labelWidthMm(value, capHeightMm), turned: false,
})

const grid = (v: number) => Math.round(v * 100) / 100

function squareCurve(side: number): CutCurve {
  const c = [{ x: 0, y: 0 }, { x: side, y: 0 }, { x: side, y: side }, { x: 0, y: side }]
  return { segments: c.map((from, i) => ({ kind: 'line' as const, from, to: c[(i + 1) % 4]! })) }
}

const num = (v: number) => String(v)

/** The test grid's squares with their settings, and its SVG and DXF. */
export function testGrid(input: TestGridInput): TestGrid {
  const powers = rangeValues('power', input.power, { min: 0, max: 100, maxSteps: MAX_ROWS, unit: '%' })
  const speeds = rangeValues('speed', input.speed, { min: 0, max: 10_000, maxSteps: MAX_COLUMNS, unit: 'mm/s' })
  const s = input.squareMm ?? 10
  const gap = input.gapMm ?? 4
  const m = input.marginMm ?? 5
  const h = input.textHeightMm ?? LABEL_DEFAULT_HEIGHT_MM
  const lg = LABEL_DEFAULT_GAP_MM
  for (const [name, v, min] of [['The square', s, 1], ['The gap', gap, 0], ['The margin', m, 0], ['The text height', h, 0.5]] as const) {
    if (typeof v !== 'number' || !Number.isFinite(v) || v < min || v > 100) throw new RangeError(`${name} must be between ${min} and 100 mm (got ${String(v)}).`)
  }
  const letters = powers.map((_, i) => String.fromCharCode(65 + i))
  const rowHeads = powers.map((p, i) => `${letters[i]}: ${num(p)}`)
  const colHeads = speeds.map((v, i) => `${i + 1}: ${num(v)}`)
  const title = 'Rows: power %. Columns: speed mm/s.'
  const w = (t: string) => labelWidthMm(t, h)
  const descent = h * DESCENT_CAPS

  // Text lines above the grid: the title, then the column heads.
  const titleBase = m + h
  const headBase = titleBase + LINE_PITCH_CAPS * h
  const top = grid(headBase + descent + lg)
  const left = grid(m + Math.max(...rowHeads.map(w)) + 2 * lg)
  const labelOf = (r: number, c: number) => `${letters[r]}${c + 1}`
  const cellW = Math.max(s, w(labelOf(powers.length - 1, speeds.length - 1)), ...colHeads.map(w))
  const cellH = s + lg + h * (1 + DESCENT_CAPS)
  const pitchX = grid(cellW + gap), pitchY = grid(cellH + gap)
  const widthMm = grid(Math.max(left + speeds.length * pitchX - gap + m, m + w(title) + m))
  const heightMm = grid(top + powers.length * pitchY - gap + m)
  if (input.sheetWidthMm !== undefined && input.sheetHeightMm !== undefined) {
    const fits = (widthMm <= input.sheetWidthMm && heightMm <= input.sheetHeightMm) || (widthMm <= input.sheetHeightMm && heightMm <= input.sheetWidthMm)
    if (!fits) throw new RangeError(`The test grid is ${widthMm} × ${heightMm} mm and does not fit on the ${input.sheetWidthMm} × ${input.sheetHeightMm} mm sheet: use fewer steps or smaller squares.`)
  }

  const kerf = input.kerfMm ?? 0
  const design = prepareDesign({ id: 'square', curves: [squareCurve(s)], widthMm: s, heightMm: s }, kerf)
  const mirror = input.mirror ?? false
  const squares: TestSquare[] = []
  const copies: PlanCopy[] = []
  const texts: PlanText[] = [text('title', title, m, titleBase, h)]
  speeds.forEach((_, c) => texts.push(text(`column-${c + 1}`, colHeads[c]!, grid(left + c * pitchX), headBase, h)))
  powers.forEach((power, r) => {
    const y = grid(top + r * pitchY)
    texts.push(text(`row-${letters[r]}`, rowHeads[r]!, m, grid(y + s / 2 + h / 2), h))
    speeds.forEach((speed, c) => {
      const x = grid(left + c * pitchX)
      const label = labelOf(r, c)
      const box = { x, y, width: s, height: s }
      squares.push({ label, row: r, column: c, powerPercent: power, speedMmS: speed, box })
      const b = design.box // the square's box in its own coordinates: −kerf/2 … s + kerf/2
      copies.push({ id: label, designId: design.id, transform: boxTransform(design, { x: x + b.x0, y: y + b.y0, width: b.x1 - b.x0, height: b.y1 - b.y0 }, false, mirror) })
      texts.push(text(label, label, x, grid(y + s + lg + h), h))
    })
  })
  const plan: SheetPlan = {
    number: 1, sheets: 1, widthMm, heightMm, strokeMm: input.strokeMm ?? HAIRLINE_MM,
    designs: [design], copies, frames: [], weedingLines: [], texts,
    notes: `test grid of ${squares.length} squares of ${num(s)} mm: power ${num(powers[0]!)}–${num(powers[powers.length - 1]!)} % by row (A–${letters[letters.length - 1]}), speed ${num(speeds[0]!)}–${num(speeds[speeds.length - 1]!)} mm/s by column (1–${speeds.length})${kerf > 0 ? `, cut paths compensated for a ${num(kerf)} mm kerf` : ''}; set each square's power and speed on the laser from the table that comes with it`,
  }
  return {
    widthMm, heightMm, squares,
    rows: powers.map((p, i) => ({ letter: letters[i]!, powerPercent: p })),
    columns: speeds.map((v, i) => ({ number: i + 1, speedMmS: v })),
    svg: writeSheetSvg(plan),
    dxf: writeSheetDxf(plan),
  }
}
