// Reading the clean vector back into geometry, and flattening its curves for the DXF.
//
// The clean vector is our own output (server/pipeline/clean.ts after svgo): a root
// <svg width="Wmm" height="Hmm" viewBox="0 0 W H"> holding one or more <path d="…"> elements.
// This reader accepts exactly that shape and refuses, with a clear error, anything whose
// geometry it would otherwise silently get wrong (transforms, other shape elements, arcs,
// a non-uniform viewBox mapping).
import { parsePathData } from '../pipeline/svgpath'
import type { Point, Segment } from '../pipeline/trace'

export type { Point, Segment }
export type CubicSegment = Extract<Segment, { kind: 'cubic' }>

/** A closed curve in mm (y down): consecutive segments, the last ending where the first starts. */
export interface CutCurve {
  segments: Segment[]
}

export interface ClosedCurvesMm {
  widthMm: number
  heightMm: number
  curves: CutCurve[]
}

// ---------------------------------------------------------------------------------------
// Numbers
// ---------------------------------------------------------------------------------------

/** Round to the 0.01 mm grid of our files ("-0" becomes 0). */
export function round2(v: number): number {
  const r = Math.round(v * 100) / 100
  return r === 0 ? 0 : r
}

/** A number on the 0.01 mm grid, printed without trailing zeros. */
export function formatMm(v: number): string {
  const r = round2(v)
  if (r === 0) return '0'
  return r.toFixed(2).replace(/0+$/, '').replace(/\.$/, '')
}

// ---------------------------------------------------------------------------------------
// The root element
// ---------------------------------------------------------------------------------------

/**
 * Millimetres per unit for the unit identifiers SVG 1.1 allows on width and height (§7.10),
 * with the absolute-length ratios of CSS Values and Units Level 3 §5.2:
 * 1in = 2.54cm = 25.4mm = 72pt = 6pc = 96px. A number without a unit is in px.
 */
const MM_PER_UNIT: Record<string, number> = {
  mm: 1, cm: 10, in: 25.4, pt: 25.4 / 72, pc: 25.4 / 6, px: 25.4 / 96, '': 25.4 / 96,
}

function attributes(tag: string): Map<string, string> {
  const out = new Map<string, string>()
  const re = /([A-Za-z_:][\w:.-]*)\s*=\s*(?:"([^"]*)"|'([^']*)')/g
  for (const m of tag.matchAll(re)) out.set(m[1]!, m[2] ?? m[3] ?? '')
  return out
}

function lengthMm(name: string, value: string | undefined): number {
  if (value === undefined) throw new SyntaxError(`The SVG root has no ${name}.`)
  const m = /^\s*([+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)\s*(mm|cm|in|pt|pc|px|)\s*$/.exec(value)
  if (!m) throw new SyntaxError(`The SVG root's ${name} "${value}" is not an absolute length.`)
  const v = Number(m[1]) * MM_PER_UNIT[m[2]!]!
  if (!(v > 0) || !Number.isFinite(v)) throw new SyntaxError(`The SVG root's ${name} must be positive.`)
  return v
}

export interface SvgRoot {
  widthMm: number
  heightMm: number
  viewBox: { x: number, y: number, width: number, height: number }
  /** Millimetres per user unit. */
  mmPerUnit: number
}

/** The root <svg> element's physical size and its user-unit → mm mapping (SVG 1.1 §7.7). */
export function readSvgRoot(svg: string): SvgRoot {
  const tag = /<svg\b[^>]*>/.exec(svg)?.[0]
  if (!tag) throw new SyntaxError('No <svg> element found.')
  const a = attributes(tag)
  const widthMm = lengthMm('width', a.get('width'))
  const heightMm = lengthMm('height', a.get('height'))
  const vbText = a.get('viewBox')
  const vb = vbText === undefined ? [0, 0, widthMm, heightMm] : vbText.trim().split(/[\s,]+/).map(Number)
  if (vb.length !== 4 || vb.some((v) => !Number.isFinite(v)) || !(vb[2]! > 0 && vb[3]! > 0)) {
    throw new SyntaxError(`The SVG root's viewBox "${vbText}" is not four numbers with a positive size.`)
  }
  const sx = widthMm / vb[2]!, sy = heightMm / vb[3]!
  // A viewBox whose aspect differs from width/height would be letterboxed by
  // preserveAspectRatio; our clean vector never does that, so refuse rather than guess.
  if (Math.abs(sx / sy - 1) > 1e-6) {
    throw new SyntaxError('The viewBox does not have the aspect of width × height; this is not a clean vector.')
  }
  return { widthMm, heightMm, viewBox: { x: vb[0]!, y: vb[1]!, width: vb[2]!, height: vb[3]! }, mmPerUnit: sx }
}

// ---------------------------------------------------------------------------------------
// The clean vector's paths
// ---------------------------------------------------------------------------------------

const REFUSED_ELEMENTS = /<(rect|circle|ellipse|line|polyline|polygon|use|image|text)\b/

/**
 * Closed curves in mm (y down, origin at the top-left of the copy's box) of every <path> in a
 * clean vector, with the copy's physical size. A subpath that is not closed with Z is closed
 * by a straight line back to its start, as SVG fills it (SVG 1.1 §8.3.3): the laser cuts a
 * closed outline either way.
 */
export function readCleanVector(svg: string): ClosedCurvesMm {
  const root = readSvgRoot(svg)
  if (/\btransform\s*=/.test(svg)) throw new SyntaxError('Transforms are not expected in a clean vector.')
  const refused = REFUSED_ELEMENTS.exec(svg)
  if (refused) throw new SyntaxError(`A <${refused[1]}> element is not expected in a clean vector (only <path>).`)
  const k = root.mmPerUnit, ox = root.viewBox.x, oy = root.viewBox.y
  const p = (pt: Point): Point => ({ x: (pt.x - ox) * k, y: (pt.y - oy) * k })
  const curves: CutCurve[] = []
  for (const m of svg.matchAll(/<path\b[^>]*>/g)) {
    const d = attributes(m[0]).get('d')
    if (d === undefined) continue
    for (const sub of parsePathData(d)) {
      const segments: Segment[] = sub.segments.map((s) => s.kind === 'line'
        ? { kind: 'line', from: p(s.from), to: p(s.to) }
        : { kind: 'cubic', from: p(s.from), c1: p(s.c1), c2: p(s.c2), to: p(s.to) })
      const first = segments[0]!.from, last = segments[segments.length - 1]!.to
      if (last.x !== first.x || last.y !== first.y) segments.push({ kind: 'line', from: last, to: { ...first } })
      curves.push({ segments })
    }
  }
  return { widthMm: root.widthMm, heightMm: root.heightMm, curves }
}

// ---------------------------------------------------------------------------------------
// Flattening
//
// Bound used: for a cubic P0 P1 P2 P3, let δ = max(dist(P1, [P0P3]), dist(P2, [P0P3])), the
// distances of the inner control points from the chord as a segment. Then every point of the
// curve lies within δ of the chord, and every point of the chord within δ of the curve:
//  - the curve lies in the convex hull of its control points (Bernstein weights are ≥ 0 and
//    sum to 1), and the distance to a convex set (the chord) is a convex function, so its
//    maximum over the hull is reached at a hull vertex: P0 and P3 give 0, P1 and P2 give δ;
//  - the curve is connected and runs from P0 to P3, so its projection onto the chord's line
//    covers the whole chord; each chord point q is the foot of some curve point B, and
//    |B − q| = dist(B, line) ≤ dist(B, chord) ≤ δ.
// So the polyline of chords is within δ of the curve both ways (Hausdorff distance ≤ δ).
// A cubic whose δ exceeds the tolerance is split in half (de Casteljau at t = ½) and each
// half treated alike; δ shrinks about fourfold per split. The vertices are points of the
// curve itself (exact up to floating point).
// ---------------------------------------------------------------------------------------

/** Default chord tolerance for cut files, mm. */
export const FLATTEN_TOLERANCE_MM = 0.05
/** Split depth limit: after 24 halvings a piece spans 2⁻²⁴ of the parameter range. */
const MAX_SPLIT_DEPTH = 24

function distanceToSegment(p: Point, a: Point, b: Point): number {
  const dx = b.x - a.x, dy = b.y - a.y
  const len2 = dx * dx + dy * dy
  let t = len2 === 0 ? 0 : ((p.x - a.x) * dx + (p.y - a.y) * dy) / len2
  t = Math.max(0, Math.min(1, t))
  return Math.hypot(p.x - (a.x + t * dx), p.y - (a.y + t * dy))
}

/** δ of the bound above: the larger distance of the inner control points from the chord. */
export function cubicFlatness(s: CubicSegment): number {
  return Math.max(distanceToSegment(s.c1, s.from, s.to), distanceToSegment(s.c2, s.from, s.to))
}

const mid = (a: Point, b: Point): Point => ({ x: (a.x + b.x) / 2, y: (a.y + b.y) / 2 })

/** de Casteljau split at t = ½. */
export function splitCubic(s: CubicSegment): [CubicSegment, CubicSegment] {
  const p01 = mid(s.from, s.c1), p12 = mid(s.c1, s.c2), p23 = mid(s.c2, s.to)
  const p012 = mid(p01, p12), p123 = mid(p12, p23)
  const m = mid(p012, p123)
  return [
    { kind: 'cubic', from: s.from, c1: p01, c2: p012, to: m },
    { kind: 'cubic', from: m, c1: p123, c2: p23, to: s.to },
  ]
}

function flattenInto(s: CubicSegment, tolerance: number, depth: number, out: Point[]): void {
  if (depth >= MAX_SPLIT_DEPTH || cubicFlatness(s) <= tolerance) { out.push(s.to); return }
  const [a, b] = splitCubic(s)
  flattenInto(a, tolerance, depth + 1, out)
  flattenInto(b, tolerance, depth + 1, out)
}

function checkTolerance(tolerance: number): void {
  if (!(tolerance > 0) || !Number.isFinite(tolerance)) throw new RangeError('The flattening tolerance must be a positive number of millimetres.')
}

/**
 * A cubic as a polyline within `tolerance` (mm) of it, both ways (see the bound above).
 * Returns the vertices from the start point to the end point inclusive.
 */
export function flattenCubic(s: CubicSegment, tolerance = FLATTEN_TOLERANCE_MM): Point[] {
  checkTolerance(tolerance)
  const out: Point[] = [s.from]
  flattenInto(s, tolerance, 0, out)
  return out
}

/**
 * A closed curve as a closed polygon within `tolerance` (mm): the vertices in order, the
 * first not repeated at the end (the closing edge is implied, as in a closed DXF polyline).
 * Consecutive duplicate vertices are dropped.
 */
export function flattenCurve(curve: CutCurve, tolerance = FLATTEN_TOLERANCE_MM): Point[] {
  checkTolerance(tolerance)
  const out: Point[] = []
  const push = (p: Point) => {
    const last = out[out.length - 1]
    if (!last || last.x !== p.x || last.y !== p.y) out.push(p)
  }
  for (const s of curve.segments) {
    if (out.length === 0) push(s.from)
    if (s.kind === 'line') push(s.to)
    else {
      const pts: Point[] = []
      flattenInto(s, tolerance, 0, pts)
      for (const p of pts) push(p)
    }
  }
  const first = out[0], last = out[out.length - 1]
  if (out.length > 1 && first && last && first.x === last.x && first.y === last.y) out.pop()
  return out
}

/** Perimeter of a closed polygon (including the closing edge). */
export function polygonPerimeter(points: Point[]): number {
  let l = 0
  for (let i = 0; i < points.length; i++) {
    const a = points[i]!, b = points[(i + 1) % points.length]!
    l += Math.hypot(b.x - a.x, b.y - a.y)
  }
  return l
}

/** The clean vector's curves scaled to `widthMm` wide (a placed copy's size), from the stored file's bytes. */
export function readCleanVectorAt(bytes: Uint8Array, widthMm: number): { curves: CutCurve[]; widthMm: number; heightMm: number } {
  const vector = readCleanVector(new TextDecoder().decode(bytes))
  const k = widthMm / vector.widthMm
  const s = (p: Point) => ({ x: p.x * k, y: p.y * k })
  const curves: CutCurve[] = vector.curves.map((c) => ({
    segments: c.segments.map((g) => g.kind === 'line'
      ? { kind: 'line' as const, from: s(g.from), to: s(g.to) }
      : { kind: 'cubic' as const, from: s(g.from), c1: s(g.c1), c2: s(g.c2), to: s(g.to) }),
  }))
  return { curves, widthMm: vector.widthMm * k, heightMm: vector.heightMm * k }
}
