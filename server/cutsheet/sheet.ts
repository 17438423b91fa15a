// A batch's cut sheets, end to end: designs prepared once (kerf, cut order, grid), copies
// packed, weeding lines and labels worked out, then each sheet written as SVG and DXF from
// one plan, so both files carry the same geometry.
//
// Plain data in, plain data out (strings and numbers, no class instances or functions), so
// buildCutSheets can run unchanged in a worker thread.
import { checkKerf, prepareDesign, type PreparedDesign } from './design'
import { writeSheetDxf } from './dxf'
import type { PlanText, PlanCopy, SheetPlan } from './plan'
import { packBatch, DESCENT_CAPS, LABEL_DEFAULT_HEIGHT_MM, type PackDesign, type PackInput, type PackedCopy, type SheetUsage } from './pack'
import { formatMm, type CutCurve, type Point } from './path'
import { apply, compose, type Affine, type Rect } from './place'
import { HAIRLINE_MM, writeSheetSvg } from './svg'
import { designKeepOut, rectKeepOut, weedingLines, type WeedingLineOptions } from './weeding'

export type { PlanCopy, PlanText, SheetPlan } from './plan'

export interface BatchDesign extends PackDesign {
  /** Closed curves at the placed size, mm, y down, origin at the top-left of the drawn box. */
  curves: CutCurve[]
}

export interface BatchSheetInput extends Omit<PackInput, 'designs'> {
  designs: BatchDesign[]
  /** Flip every copy within its own box (film cut from the back). Labels are never mirrored. */
  mirror?: boolean
  /** null or absent: none. */
  weedingLines?: WeedingLineOptions | null
  /** Stroke width in the SVG, mm (default HAIRLINE_MM). */
  strokeMm?: number
  /** Chord tolerance for flattening curves, mm (default 0.05). */
  toleranceMm?: number
  /** Which files to write (default both). */
  formats?: { svg?: boolean, dxf?: boolean }
}

export interface SheetCopyOut {
  label: string
  designId: string
  turned: boolean
  /** The copy's box on the sheet (the drawn box grown by half the kerf), mm, y down. */
  box: Rect
}

export interface BuiltSheet extends SheetUsage {
  copiesOnSheet: SheetCopyOut[]
  weedingLineCount: number
  weedingLengthMm: number
  svg?: string
  dxf?: string
}

export interface BatchSheets {
  method: 'grid' | 'packer'
  sheets: BuiltSheet[]
  /** Drawn-box area of all copies ÷ area of all sheets used × 100. */
  usagePercent: number
  kerfMm: number
}

export type PlannedSheet = Omit<BuiltSheet, 'svg' | 'dxf'> & { plan: SheetPlan }
export type PlannedSheets = Omit<BatchSheets, 'sheets'> & { sheets: PlannedSheet[] }

/** The transform taking design coordinates onto its box on the sheet (see place.ts for the order). */
export function boxTransform(design: PreparedDesign, box: Rect, turned: boolean, mirror: boolean): Affine {
  const { x0, y0, x1, y1 } = design.box
  const bw = x1 - x0, bh = y1 - y0
  let t: Affine = { a: 1, b: 0, c: 0, d: 1, e: -x0, f: -y0 }
  if (mirror) t = compose({ a: -1, b: 0, c: 0, d: 1, e: bw, f: 0 }, t)
  if (turned) t = compose({ a: 0, b: 1, c: -1, d: 0, e: bh, f: 0 }, t)
  t = compose({ a: 1, b: 0, c: 0, d: 1, e: box.x, f: box.y }, t)
  // a…d are 0 or ±1; the translation goes on the 0.01 mm grid once, for both files.
  const g = (v: number) => Math.round(v * 100) / 100 || 0
  return { a: t.a || 0, b: t.b || 0, c: t.c || 0, d: t.d || 0, e: g(t.e), f: g(t.f) }
}

function labelText(c: PackedCopy, capHeight: number): PlanText | null {
  const r = c.labelBox
  if (!r) return null
  const descent = capHeight * DESCENT_CAPS
  return c.turned
    // Turned clockwise, the baseline runs down the sheet with the descender room on its left.
    ? { id: c.label, text: c.label, x: r.x + descent, y: r.y, capHeightMm: capHeight, widthMm: r.height, turned: true }
    : { id: c.label, text: c.label, x: r.x, y: r.y + capHeight, capHeightMm: capHeight, widthMm: r.width, turned: false }
}

function transformPolygon(t: Affine, poly: Point[]): Point[] {
  return poly.map((p) => apply(t, p))
}

function sheetNotes(n: number, of: number, copies: number, designs: number, input: BatchSheetInput, kerf: number, lines: number): string {
  const parts = [
    `${copies} ${copies === 1 ? 'copy' : 'copies'} of ${designs} ${designs === 1 ? 'design' : 'designs'}`,
    kerf > 0 ? `cut paths compensated for a ${formatMm(kerf)} mm kerf` : 'no kerf compensation',
    input.mirror ? 'mirrored' : null,
    input.weedingFrameMm ? `weeding frame ${formatMm(input.weedingFrameMm)} mm from each copy` : null,
    input.weedingLines ? `${lines} weeding ${lines === 1 ? 'line' : 'lines'} at least ${formatMm(input.weedingLines.clearanceMm)} mm from every copy` : null,
  ].filter(Boolean)
  return `cut sheet ${n} of ${of}: ${parts.join(', ')}`
}

/**
 * Packs a batch and works out every sheet's plan (what its files will say). Throws RangeError
 * for input that would give a wrong file or for copies that do not fit, with the reason.
 */
export function planCutSheets(input: BatchSheetInput): PlannedSheets {
  const kerf = checkKerf(input.kerfMm ?? 0)
  const mirror = input.mirror ?? false
  if (typeof mirror !== 'boolean') throw new RangeError('mirror must be true or false.')
  const stroke = input.strokeMm ?? HAIRLINE_MM
  if (typeof stroke !== 'number' || !Number.isFinite(stroke) || stroke <= 0) throw new RangeError('The stroke width must be a positive number of millimetres.')
  if (!Array.isArray(input.designs) || input.designs.length === 0) throw new RangeError('A batch needs at least one design.')
  const prepared = new Map<string, PreparedDesign>()
  for (const d of input.designs) prepared.set(d.id, prepareDesign({ id: d.id, curves: d.curves, widthMm: d.widthMm, heightMm: d.heightMm }, kerf, input.toleranceMm))
  // Packed by the prepared boxes, which hold the whole cut path.
  const packed = packBatch({ ...input, designs: input.designs.map(({ curves: _curves, ...d }) => ({ ...d, extentMm: prepared.get(d.id)!.box })) })
  if (!packed.fits) throw new RangeError(packed.reason ?? 'The batch does not fit on the sheet.')
  const weeding = input.weedingLines ?? null
  const keepOuts = new Map<string, Point[][]>()
  if (weeding) for (const [id, d] of prepared) keepOuts.set(id, designKeepOut(d, weeding.clearanceMm))
  const capHeight = input.labels?.heightMm ?? LABEL_DEFAULT_HEIGHT_MM

  const sheets: PlannedSheet[] = packed.perSheet.map((usage) => {
    const on = packed.copies.filter((c) => c.sheet === usage.sheet)
    const copies: PlanCopy[] = on.map((c) => ({ id: c.label, designId: c.designId, transform: boxTransform(prepared.get(c.designId)!, c.box, c.turned, mirror) }))
    const frames = on.flatMap((c) => (c.frame ? [{ id: c.label, rect: c.frame }] : []))
    const texts = on.map((c) => labelText(c, capHeight)).filter((t): t is PlanText => t !== null)
    let lines: Point[][] = []
    if (weeding) {
      const keepOut: Point[][] = []
      on.forEach((c, i) => {
        for (const poly of keepOuts.get(c.designId)!) keepOut.push(transformPolygon(copies[i]!.transform, poly))
        if (c.frame) keepOut.push(rectKeepOut(c.frame, weeding.clearanceMm))
        if (c.labelBox) keepOut.push(rectKeepOut(c.labelBox, weeding.clearanceMm))
      })
      lines = weedingLines({ widthMm: input.sheetWidthMm, heightMm: input.sheetHeightMm, marginMm: input.marginMm }, keepOut, weeding)
    }
    const usedIds = new Set(on.map((c) => c.designId))
    const plan: SheetPlan = {
      number: usage.sheet, sheets: packed.sheets, widthMm: input.sheetWidthMm, heightMm: input.sheetHeightMm, strokeMm: stroke,
      designs: [...prepared.values()].filter((d) => usedIds.has(d.id)),
      copies, frames, weedingLines: lines, texts,
      notes: sheetNotes(usage.sheet, packed.sheets, on.length, usedIds.size, input, kerf, lines.length),
    }
    return {
      ...usage,
      copiesOnSheet: on.map((c) => ({ label: c.label, designId: c.designId, turned: c.turned, box: c.box })),
      weedingLineCount: lines.length,
      weedingLengthMm: lines.reduce((s, l) => s + Math.hypot(l[1]!.x - l[0]!.x, l[1]!.y - l[0]!.y), 0),
      plan,
    }
  })
  return { method: packed.method, sheets, usagePercent: packed.usagePercent, kerfMm: kerf }
}

/** Packs and writes a batch's cut sheets, SVG and DXF as text (see planCutSheets for what it refuses). */
export function buildCutSheets(input: BatchSheetInput): BatchSheets {
  const planned = planCutSheets(input)
  const formats = { svg: input.formats?.svg ?? true, dxf: input.formats?.dxf ?? true }
  return {
    ...planned,
    sheets: planned.sheets.map(({ plan, ...sheet }) => ({
      ...sheet,
      ...(formats.svg ? { svg: writeSheetSvg(plan) } : {}),
      ...(formats.dxf ? { dxf: writeSheetDxf(plan) } : {}),
    })),
  }
}
