// Weeding lines: extra cuts in the waste film, so that the waste between and around the
// copies peels off in narrow strips instead of one sheet that tears at the first tight spot.
//
// The lines are a grid across the usable part of the sheet (inside the margin), no more than
// `spacingMm` apart, with every part that comes within `clearanceMm` of a copy removed. The
// keep-out zone around a copy follows its outline (holes filled in: a hole's waste comes out
// with the piece's weeding), so lines also run into the large waste areas of a concave design
// and over the unused part of a sheet; around a weeding frame or a label it is their
// rectangle. Clearance is measured between centre lines of the cuts, as the files draw them.
//
// Guarantee: each keep-out zone is the outline grown by clearance + KEEP_OUT_SLACK_MM with
// round joins whose chords stray at most ARC_CHORD_FACTOR × WEEDING_ARC_TOLERANCE_MM inside
// the true arc (see clipper.ts), and the files round vertices to the 0.01 mm grid (≤ 0.005 mm
// along a straight line's own direction), so every point of every weeding line is at least
// `clearanceMm` from every cut of a copy.
import { ARC_CHORD_FACTOR, clipLinesOutside, grownOutline } from './clipper'
import type { PreparedDesign } from './design'
import { positiveMm } from './design'
import type { Point } from './path'
import type { Rect } from './place'

export interface WeedingLineOptions {
  /** Widest strip between neighbouring parallel lines, mm. */
  spacingMm: number
  /** Least distance from any line to any copy (and to labels and frames), mm. */
  clearanceMm: number
  /** Pieces of line shorter than this are left out, mm (default 2). */
  minLengthMm?: number
}

export const WEEDING_ARC_TOLERANCE_MM = 0.01
/** Covers the arc chords and the 0.01 mm grid of the files. */
export const KEEP_OUT_SLACK_MM = ARC_CHORD_FACTOR * WEEDING_ARC_TOLERANCE_MM + 0.01
export const DEFAULT_MIN_WEEDING_LENGTH_MM = 2

export function checkWeedingOptions(o: WeedingLineOptions): Required<WeedingLineOptions> {
  const spacing = positiveMm('The weeding line spacing', o.spacingMm)
  const clearance = positiveMm("The weeding lines' clearance", o.clearanceMm)
  const minLength = o.minLengthMm ?? DEFAULT_MIN_WEEDING_LENGTH_MM
  if (typeof minLength !== 'number' || !Number.isFinite(minLength) || minLength < 0) throw new RangeError('The shortest weeding line must be zero or a positive number of millimetres.')
  return { spacingMm: spacing, clearanceMm: clearance, minLengthMm: minLength }
}

/** A design's keep-out zone in its own coordinates (computed once per design, used for every copy). */
export function designKeepOut(design: PreparedDesign, clearanceMm: number): Point[][] {
  return grownOutline(design.polygonsMm, clearanceMm + KEEP_OUT_SLACK_MM, WEEDING_ARC_TOLERANCE_MM)
}

export function rectKeepOut(r: Rect, clearanceMm: number): Point[] {
  const c = clearanceMm + KEEP_OUT_SLACK_MM
  return [
    { x: r.x - c, y: r.y - c }, { x: r.x + r.width + c, y: r.y - c },
    { x: r.x + r.width + c, y: r.y + r.height + c }, { x: r.x - c, y: r.y + r.height + c },
  ]
}

/** Positions from a to b (exclusive), evenly spaced, no more than `spacing` apart, on the 0.01 mm grid. */
function linePositions(a: number, b: number, spacing: number): number[] {
  const n = Math.ceil((b - a) / spacing - 1e-9)
  const out: number[] = []
  for (let i = 1; i < n; i++) out.push(Math.round((a + ((b - a) * i) / n) * 100) / 100)
  return out
}

/**
 * The weeding lines of one sheet: straight pieces of the grid outside every keep-out zone,
 * each at least `minLengthMm` long, as two-point polylines in sheet mm (y down).
 */
export function weedingLines(sheet: { widthMm: number, heightMm: number, marginMm: number }, keepOut: Point[][], options: WeedingLineOptions): Point[][] {
  const o = checkWeedingOptions(options)
  const { widthMm: W, heightMm: H, marginMm: m } = sheet
  const x0 = m, x1 = W - m, y0 = m, y1 = H - m
  if (!(x1 > x0 && y1 > y0)) return []
  const lines: Point[][] = [
    ...linePositions(x0, x1, o.spacingMm).map((x) => [{ x, y: y0 }, { x, y: y1 }]),
    ...linePositions(y0, y1, o.spacingMm).map((y) => [{ x: x0, y }, { x: x1, y }]),
  ]
  if (lines.length === 0) return []
  const pieces = keepOut.length ? clipLinesOutside(lines, keepOut) : lines
  return pieces
    .filter((p) => p.length >= 2 && Math.hypot(p[p.length - 1]!.x - p[0]!.x, p[p.length - 1]!.y - p[0]!.y) >= o.minLengthMm)
    .map((p) => {
      // Straight pieces of axis-parallel lines: keep the ends, ordered left to right / top to bottom.
      const a = p[0]!, b = p[p.length - 1]!
      return a.x < b.x || (a.x === b.x && a.y < b.y) ? [a, b] : [b, a]
    })
    .sort((p, q) => p[0]!.y - q[0]!.y || p[0]!.x - q[0]!.x || p[1]!.y - q[1]!.y)
}
