// Measurements of one layer's clean vector, read back from the SVG itself (not trusted from the
// generator): size, ink area, cut length, pieces, holes, nodes, the tallest piece (for a
// numerals layer, the numeral height), the margin to the edge, and the narrowest stroke.
//
// The narrowest stroke uses the pipeline's definition (narrowestFeature in
// server/pipeline/geometry.ts) on the vector rasterised at STROKE_PX_PER_MM or finer. To keep
// memory small, the vector is rasterised in windows: each window is a group of pieces whose
// bounding boxes (padded by WINDOW_PAD_MM) overlap, so every piece lies whole inside exactly one
// window and nothing else reaches into it; the layer's narrowest stroke is the least over the
// windows.
import type { Measurements } from '../../shared/types/pipeline'
import { readCleanVector, round2, type CutCurve } from '../cutsheet/path'
import { rasteriseSvg } from '../pipeline/fidelity'
import { measureCurves, narrowestFeatureMm, smallPieces } from '../pipeline/geometry'
import { DEFAULT_SMALL_PIECE_MM2 } from '../pipeline/run'
import type { ClosedCurve, Point, Segment } from '../pipeline/trace'
import { signByNesting } from './outline'

/** Resolution for the narrowest stroke: 20 px/mm puts a 0.05 mm step within one pixel. */
export const STROKE_PX_PER_MM = 20
/** Paper kept around each window, so the distance transform meets paper before the window's edge. */
export const WINDOW_PAD_MM = 1
/** Largest window in pixels; a larger one is rasterised coarser (and says so in strokePxPerMm). */
export const WINDOW_MAX_PIXELS = 24_000_000

export type LayerMeasurements = Pick<Measurements,
  'widthMm' | 'heightMm' | 'inkAreaMm2' | 'cutLengthMm' | 'pieces' | 'holes' | 'nodes' | 'narrowestFeatureMm' | 'smallPieces' | 'smallPieceLimitMm2'
> & {
  /** Height of the tallest piece of ink (an outer curve's bounding box), mm; null without ink. */
  tallestPieceMm: number | null
  /** Least distance from the ink's bounding box to the edge of the vector's box, mm; null without ink. */
  marginMm: number | null
  /** Bounding box of all ink, mm (y down from the top-left corner). */
  inkBounds: { minX: number; minY: number; maxX: number; maxY: number } | null
  /** Coarsest resolution at which the narrowest stroke was measured, px/mm (0 when skipped). */
  strokePxPerMm: number
}

interface Box { minX: number; minY: number; maxX: number; maxY: number }

const overlaps = (a: Box, b: Box) => a.minX <= b.maxX && b.minX <= a.maxX && a.minY <= b.maxY && b.minY <= a.maxY
const union = (a: Box, b: Box): Box => ({
  minX: Math.min(a.minX, b.minX), minY: Math.min(a.minY, b.minY), maxX: Math.max(a.maxX, b.maxX), maxY: Math.max(a.maxY, b.maxY),
})

/** Padded boxes of the pieces merged until no two overlap. */
export function strokeWindows(pieceBoxes: Box[], padMm = WINDOW_PAD_MM): Box[] {
  let boxes = pieceBoxes.map((b) => ({ minX: b.minX - padMm, minY: b.minY - padMm, maxX: b.maxX + padMm, maxY: b.maxY + padMm }))
  let merged = true
  while (merged) {
    merged = false
    const out: Box[] = []
    for (const b of boxes) {
      const i = out.findIndex((o) => overlaps(o, b))
      if (i >= 0) { out[i] = union(out[i]!, b); merged = true } else out.push(b)
    }
    boxes = out
  }
  return boxes
}

/** The layer's paths alone, in a document whose viewBox is the window. */
function windowDocument(svg: string, w: Box): string {
  const paths = [...svg.matchAll(/<path\b[^>]*\bd="([^"]*)"[^>]*>/g)].map((m) => `<path d="${m[1]}" fill-rule="evenodd"/>`)
  return `<svg xmlns="http://www.w3.org/2000/svg" viewBox="${w.minX} ${w.minY} ${w.maxX - w.minX} ${w.maxY - w.minY}">${paths.join('')}</svg>`
}

async function narrowestStroke(svg: string, windows: Box[], pxPerMm: number, maxPixels: number): Promise<{ mm: number | null; pxPerMm: number }> {
  let least: number | null = null
  let coarsest = pxPerMm
  for (const w0 of windows) {
    const wMm = w0.maxX - w0.minX, hMm = w0.maxY - w0.minY
    const k = Math.min(pxPerMm, Math.sqrt(maxPixels / (wMm * hMm)))
    const wPx = Math.ceil(wMm * k), hPx = Math.ceil(hMm * k)
    // Widen the window to whole pixels so both axes keep exactly k px/mm.
    const w = { ...w0, maxX: w0.minX + wPx / k, maxY: w0.minY + hPx / k }
    const bitmap = await rasteriseSvg(windowDocument(svg, w), wPx, hPx)
    const nf = narrowestFeatureMm(bitmap, wPx, hPx, k)
    if (nf !== null && (least === null || nf < least)) least = nf
    coarsest = Math.min(coarsest, k)
  }
  return { mm: least, pxPerMm: coarsest }
}

export interface MeasureLayerOptions {
  /** Resolution for the narrowest stroke (default STROKE_PX_PER_MM). */
  pxPerMm?: number
  /** Largest window in pixels before the resolution is lowered (default WINDOW_MAX_PIXELS). */
  maxWindowPixels?: number
  /** false: skip the narrowest stroke (narrowestFeatureMm null), for a quick look at the geometry. */
  stroke?: boolean
  smallPieceMm2?: number
  /**
   * Measure only the ink lying inside this box (mm, in the vector's coordinates), as if the box
   * were the vector: a layered plate's layer carries registration marks outside the plate.
   */
  within?: Box
}

const inside = (b: Box, w: Box) => b.minX >= w.minX - 0.01 && b.minY >= w.minY - 0.01 && b.maxX <= w.maxX + 0.01 && b.maxY <= w.maxY + 0.01

/**
 * Curves read back on the clean vector's 0.01 mm grid. Relative coordinates summed back up carry
 * floating-point error (19.36, 17.220000000000002), which would add a closing line 10⁻¹⁴ mm
 * long to a curve; snapping to the grid and dropping lines of no length removes it.
 */
function onGrid(curves: CutCurve[]): CutCurve[] {
  const p = (pt: Point): Point => ({ x: round2(pt.x), y: round2(pt.y) })
  return curves.map((c) => ({
    segments: c.segments
      .map((s): Segment => s.kind === 'line'
        ? { kind: 'line', from: p(s.from), to: p(s.to) }
        : { kind: 'cubic', from: p(s.from), c1: p(s.c1), c2: p(s.c2), to: p(s.to) })
      .filter((s) => s.kind !== 'line' || s.from.x !== s.to.x || s.from.y !== s.to.y),
  })).filter((c) => c.segments.length > 0)
}

/** Measurements of a clean vector (one layer), read from its SVG. */
export async function measureLayer(svg: string, options: MeasureLayerOptions = {}): Promise<LayerMeasurements> {
  const pxPerMm = options.pxPerMm ?? STROKE_PX_PER_MM
  const limit = options.smallPieceMm2 ?? DEFAULT_SMALL_PIECE_MM2
  const vector = readCleanVector(svg)
  const w = options.within
  const all: ClosedCurve[] = signByNesting(onGrid(vector.curves))
  const curves = w ? all.filter((c) => { const b = measureCurves([c], 1).bounds; return b !== null && inside(b, w) }) : all
  const g = measureCurves(curves, 1)
  const pieceBoxes: Box[] = []
  let tallest: number | null = null
  for (const c of curves) {
    if (c.sign < 0) continue
    const b = measureCurves([c], 1).bounds
    if (!b) continue
    pieceBoxes.push(b)
    tallest = Math.max(tallest ?? 0, b.maxY - b.minY)
  }
  const stroke = options.stroke === false
    ? { mm: null, pxPerMm: 0 }
    : await narrowestStroke(svg, strokeWindows(pieceBoxes), pxPerMm, options.maxWindowPixels ?? WINDOW_MAX_PIXELS)
  const o = w ? { x: w.minX, y: w.minY } : { x: 0, y: 0 }
  const widthMm = w ? round2(w.maxX - w.minX) : vector.widthMm
  const heightMm = w ? round2(w.maxY - w.minY) : vector.heightMm
  const b = g.bounds && { minX: g.bounds.minX - o.x, minY: g.bounds.minY - o.y, maxX: g.bounds.maxX - o.x, maxY: g.bounds.maxY - o.y }
  return {
    widthMm,
    heightMm,
    inkAreaMm2: g.inkAreaMm2,
    cutLengthMm: g.cutLengthMm,
    pieces: g.pieces,
    holes: g.holes,
    nodes: g.nodeCount,
    narrowestFeatureMm: stroke.mm,
    smallPieces: smallPieces(curves, 1, limit).length,
    smallPieceLimitMm2: limit,
    tallestPieceMm: tallest,
    marginMm: b ? Math.min(b.minX, b.minY, widthMm - b.maxX, heightMm - b.maxY) : null,
    inkBounds: b,
    strokePxPerMm: stroke.pxPerMm,
  }
}

/** What the robot check needs from a plate revision, at the revision's own size. */
export interface PlateFigures {
  [key: string]: number | null
  numeralHeightMm: number | null
  strokeMm: number | null
  marginMm: number | null
  plateWidthMm: number
  plateHeightMm: number
}

/**
 * The figures of a plate from its numerals layer's measurements (every layer of a plate has
 * the plate's size). Scale them to a placement with scaleToPlacement (shared/plates/check.ts).
 */
export function plateFigures(numerals: LayerMeasurements): PlateFigures {
  return {
    numeralHeightMm: numerals.tallestPieceMm,
    strokeMm: numerals.narrowestFeatureMm,
    marginMm: numerals.marginMm,
    plateWidthMm: numerals.widthMm,
    plateHeightMm: numerals.heightMm,
  }
}
