// Where each copy goes on its sheet: the placement transform and the weeding frame, shared by
// the SVG and the DXF writers so that both files carry exactly the same geometry.
//
// A copy's own coordinates are those of the clean vector: mm, y down, origin at the top-left
// of its box (copyWidthMm × copyHeightMm as drawn). On the sheet, in this order:
//  1. mirrored (optional): flipped horizontally within its own box, x → copyWidth − x;
//  2. turned (when the layout says so): 90° clockwise as seen on the sheet, within its box,
//     (x, y) → (copyHeight − y, x); the box becomes copyHeight × copyWidth;
//  3. moved so that its box's top-left corner sits at the placement's (x, y).
// Mirroring before turning keeps "mirrored" meaning the same thing whether or not a copy is
// turned (a mirrored copy turned is the turned copy mirrored along its other axis, the same
// decal rotated by 180°, which makes no difference to the decal once applied).
import type { CopyPlacement, SheetLayout } from '../../shared/utils/sheet-layout'
import { prepareDesign } from './design'
import { formatMm, round2, type CutCurve, type Point } from './path'
import type { SheetPlan } from './plan'

/** x′ = a·x + c·y + e, y′ = b·x + d·y + f (the order of SVG's matrix(a b c d e f)). */
export interface Affine { a: number, b: number, c: number, d: number, e: number, f: number }

export const IDENTITY: Affine = { a: 1, b: 0, c: 0, d: 1, e: 0, f: 0 }

/** outer ∘ inner: apply inner first. */
export function compose(outer: Affine, inner: Affine): Affine {
  return {
    a: outer.a * inner.a + outer.c * inner.b,
    b: outer.b * inner.a + outer.d * inner.b,
    c: outer.a * inner.c + outer.c * inner.d,
    d: outer.b * inner.c + outer.d * inner.d,
    e: outer.a * inner.e + outer.c * inner.f + outer.e,
    f: outer.b * inner.e + outer.d * inner.f + outer.f,
  }
}

export function apply(t: Affine, p: Point): Point {
  return { x: t.a * p.x + t.c * p.y + t.e, y: t.b * p.x + t.d * p.y + t.f }
}

/**
 * The transform from a copy's own coordinates to sheet coordinates. The translation is put on
 * the 0.01 mm grid here, once, so that the SVG and the DXF place every copy identically.
 */
export function copyTransform(placement: CopyPlacement, copyWidthMm: number, copyHeightMm: number, mirror: boolean): Affine {
  let t = IDENTITY
  if (mirror) t = compose({ a: -1, b: 0, c: 0, d: 1, e: copyWidthMm, f: 0 }, t)
  if (placement.turned) t = compose({ a: 0, b: 1, c: -1, d: 0, e: copyHeightMm, f: 0 }, t)
  t = compose({ a: 1, b: 0, c: 0, d: 1, e: placement.x, f: placement.y }, t)
  // a…d are 0 or ±1 exactly; only e and f need the grid.
  return { ...t, e: round2(t.e), f: round2(t.f) }
}

export interface Rect { x: number, y: number, width: number, height: number }

export interface CutSheetInput {
  /** The copy's closed curves in its own mm coordinates (from readCleanVector). */
  curves: CutCurve[]
  /** The copy's box as drawn, mm (the clean vector's width and height). */
  copyWidthMm: number
  copyHeightMm: number
  /** From layoutSheets for this copy size and sheet. */
  layout: SheetLayout
  sheetWidthMm: number
  sheetHeightMm: number
  /** Flip every copy horizontally within its own box (film cut from the back, or applied behind a clear panel). */
  mirror: boolean
  /** null: no weeding frame; otherwise the frame's distance from the copy's box, mm (> 0). */
  weedingFrameMm: number | null
}

export interface PlacedCopy {
  /** Copy number over the whole job, counted from 1 (ids dw-copy-N and dw-frame-N). */
  number: number
  placement: CopyPlacement
  transform: Affine
  /** The weeding frame on the sheet, mm (null when there is none). */
  frame: Rect | null
}

export interface PlacedSheet {
  /** Sheet number, counted from 1. */
  number: number
  copies: PlacedCopy[]
}

const SLACK = 1e-6

function positive(name: string, v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) throw new RangeError(`${name} must be a positive number of millimetres (got ${String(v)}).`)
  return v
}

/** Smallest spacing between distinct sorted coordinates, or Infinity when there is only one. */
function smallestStep(values: number[]): number {
  const u = [...new Set(values)].sort((p, q) => p - q)
  let s = Infinity
  for (let i = 1; i < u.length; i++) s = Math.min(s, u[i]! - u[i - 1]!)
  return s
}

/**
 * Checks the input and works out, sheet by sheet, each copy's transform and weeding frame.
 * Throws RangeError for anything that would give a wrong or unsafe file: a layout that does
 * not fit, copies outside the sheet, weeding frames that would leave the sheet or cross the
 * neighbouring copy's frame (they need a gap of at least twice their offset; at exactly twice
 * the offset, neighbouring frames share an edge).
 */
export function placeCopies(input: CutSheetInput): PlacedSheet[] {
  const w = positive('The copy width', input.copyWidthMm)
  const h = positive('The copy height', input.copyHeightMm)
  const W = positive('The sheet width', input.sheetWidthMm)
  const H = positive('The sheet height', input.sheetHeightMm)
  const { layout, mirror, weedingFrameMm: frame } = input
  if (typeof mirror !== 'boolean') throw new RangeError('mirror must be true or false.')
  if (!Array.isArray(input.curves) || input.curves.length === 0) throw new RangeError('The copy has no closed curves: there is nothing to cut.')
  if (!layout || !layout.fits) throw new RangeError(layout?.reason ?? 'The layout does not fit on the sheet.')
  if (frame !== null && (typeof frame !== 'number' || !Number.isFinite(frame) || frame <= 0)) {
    throw new RangeError(`The weeding frame's offset must be null or a positive number of millimetres (got ${String(frame)}).`)
  }
  const o = frame ?? 0
  const sheets: PlacedSheet[] = []
  const bySheet = new Map<number, PlacedCopy[]>()
  layout.placements.forEach((placement, i) => {
    const pw = placement.turned ? h : w, ph = placement.turned ? w : h
    if (placement.x - o < -SLACK || placement.y - o < -SLACK || placement.x + pw + o > W + SLACK || placement.y + ph + o > H + SLACK) {
      throw new RangeError(frame === null
        ? `Copy ${i + 1} would lie outside the ${W} × ${H} mm sheet; the layout was made for another copy or sheet size.`
        : `Copy ${i + 1} with its weeding frame (${o} mm) would lie outside the ${W} × ${H} mm sheet; the margin must be at least the frame's offset.`)
    }
    let list = bySheet.get(placement.sheet)
    if (!list) {
      list = []
      bySheet.set(placement.sheet, list)
      sheets.push({ number: placement.sheet, copies: list })
    }
    list.push({
      number: i + 1,
      placement,
      transform: copyTransform(placement, w, h, mirror),
      frame: frame === null ? null : {
        x: round2(placement.x - o), y: round2(placement.y - o), width: round2(pw + 2 * o), height: round2(ph + 2 * o),
      },
    })
  })
  if (frame !== null) {
    for (const sheet of sheets) {
      const pw = layout.turned ? h : w, ph = layout.turned ? w : h
      const gapAcross = smallestStep(sheet.copies.map((c) => c.placement.x)) - pw
      const gapDown = smallestStep(sheet.copies.map((c) => c.placement.y)) - ph
      if (Math.min(gapAcross, gapDown) < 2 * o - SLACK) {
        throw new RangeError(`Weeding frames ${o} mm from each copy need a gap of at least ${2 * o} mm between copies (the gap is ${round2(Math.min(gapAcross, gapDown))} mm).`)
      }
    }
  }
  sheets.sort((p, q) => p.number - q.number)
  return sheets
}

/** The design id a one-job sheet gives its copy (dw-design-1). */
export const JOB_DESIGN_ID = '1'

/**
 * The plans of a one-job cut sheet (one design laid out by layoutSheets): copies named by
 * their number over the job (dw-copy-N), no kerf compensation, no labels.
 */
export function jobSheetPlans(input: CutSheetInput, options: { strokeMm: number, toleranceMm?: number }): SheetPlan[] {
  const sheets = placeCopies(input)
  const design = prepareDesign({ id: JOB_DESIGN_ID, curves: input.curves, widthMm: input.copyWidthMm, heightMm: input.copyHeightMm }, 0, options.toleranceMm)
  const f = formatMm
  return sheets.map((sheet) => {
    const n = sheet.copies.length
    const notes = [
      `${n} ${n === 1 ? 'copy' : 'copies'} of ${f(input.copyWidthMm)} × ${f(input.copyHeightMm)} mm`,
      input.layout.turned ? 'turned 90° clockwise' : null,
      input.mirror ? 'mirrored' : null,
      input.weedingFrameMm === null ? null : `weeding frame ${f(input.weedingFrameMm)} mm from each copy`,
    ].filter(Boolean).join(', ')
    return {
      number: sheet.number, sheets: sheets.length, widthMm: input.sheetWidthMm, heightMm: input.sheetHeightMm, strokeMm: options.strokeMm,
      designs: [design],
      copies: sheet.copies.map((c) => ({ id: String(c.number), designId: JOB_DESIGN_ID, transform: c.transform })),
      frames: sheet.copies.flatMap((c) => (c.frame ? [{ id: String(c.number), rect: c.frame }] : [])),
      weedingLines: [], texts: [],
      notes: `cut sheet ${sheet.number} of ${sheets.length}: ${notes}`,
    }
  })
}
