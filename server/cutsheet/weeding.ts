// Weeding lines: extra cuts in the waste film, so that the waste between and around the
// copies peels off in narrow strips instead of one sheet that tears at the first tight spot.
//
// The lines are a grid across the usable part of the sheet (inside the margin), no more than
// `spacingMm` apart, with every part that comes within `clearanceMm` of a copy removed. The
// keep-out zones are grown with Clipper (clipper.ts), once per design; each grid line is then
// cut where it crosses a zone's rings, an exact scanline intersection that stays quick for
// hundreds of copies of a detailed drawing. Every ring's inside is kept out, a hole in a zone
// (waste enclosed by the zone) too: that only ever errs on the safe side. The
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
import { ARC_CHORD_FACTOR, grownOutline } from './clipper'
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

interface Ring { pts: Point[], x0: number, y0: number, x1: number, y1: number }

function ringOf(pts: Point[]): Ring {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity
  for (const p of pts) {
    if (p.x < x0) x0 = p.x
    if (p.x > x1) x1 = p.x
    if (p.y < y0) y0 = p.y
    if (p.y > y1) y1 = p.y
  }
  return { pts, x0, y0, x1, y1 }
}

/**
 * Where the line u = c (u the x or the y coordinate) crosses the ring, as the other
 * coordinate; an edge counts when its ends lie on opposite sides, one end on the line counting
 * as above it (so a vertex on the line is counted once).
 */
function crossings(ring: Point[], c: number, vertical: boolean, out: number[]): void {
  const n = ring.length
  for (let i = 0, j = n - 1; i < n; j = i++) {
    const a = ring[j]!, b = ring[i]!
    const au = vertical ? a.x : a.y, bu = vertical ? b.x : b.y
    if ((au <= c) === (bu <= c)) continue
    const av = vertical ? a.y : a.x, bv = vertical ? b.y : b.x
    out.push(av + ((c - au) * (bv - av)) / (bu - au))
  }
}

/** The pieces of the segment from..to on the line u = c outside every zone, as [start, end] pairs. */
function freePieces(rings: Ring[], c: number, vertical: boolean, from: number, to: number): [number, number][] {
  const blocked: [number, number][] = []
  const xs: number[] = []
  for (const r of rings) {
    if (vertical ? c < r.x0 || c > r.x1 : c < r.y0 || c > r.y1) continue
    xs.length = 0
    crossings(r.pts, c, vertical, xs)
    xs.sort((p, q) => p - q)
    for (let i = 0; i + 1 < xs.length; i += 2) blocked.push([xs[i]!, xs[i + 1]!])
  }
  blocked.sort((p, q) => p[0] - q[0])
  const free: [number, number][] = []
  let at = from
  for (const [s, e] of blocked) {
    if (s > at) free.push([at, Math.min(s, to)])
    at = Math.max(at, e)
    if (at >= to) break
  }
  if (at < to) free.push([at, to])
  return free.filter(([s, e]) => e > s)
}

/**
 * The weeding lines of one sheet: straight pieces of the grid outside every keep-out ring
 * (closed rings in sheet mm, which may overlap), each at least `minLengthMm` long, as two-point polylines in sheet mm (y down),
 * top to bottom, then left to right.
 */
export function weedingLines(sheet: { widthMm: number, heightMm: number, marginMm: number }, keepOut: Point[][], options: WeedingLineOptions): Point[][] {
  const o = checkWeedingOptions(options)
  const { widthMm: W, heightMm: H, marginMm: m } = sheet
  const x0 = m, x1 = W - m, y0 = m, y1 = H - m
  if (!(x1 > x0 && y1 > y0)) return []
  const rings = keepOut.filter((r) => r.length >= 3).map(ringOf)
  const out: Point[][] = []
  for (const x of linePositions(x0, x1, o.spacingMm)) {
    for (const [a, b] of freePieces(rings, x, true, y0, y1)) if (b - a >= o.minLengthMm) out.push([{ x, y: a }, { x, y: b }])
  }
  for (const y of linePositions(y0, y1, o.spacingMm)) {
    for (const [a, b] of freePieces(rings, y, false, x0, x1)) if (b - a >= o.minLengthMm) out.push([{ x: a, y }, { x: b, y }])
  }
  return out.sort((p, q) => p[0]!.y - q[0]!.y || p[0]!.x - q[0]!.x || p[1]!.y - q[1]!.y)
}
