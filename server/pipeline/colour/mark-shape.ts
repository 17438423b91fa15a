// The registration mark's shape (see marks.ts) and its cut, in a module of its own free of the
// outlining and clipping libraries, so the cut queue can reckon with the marks.
import type { MarksCut } from '../../../shared/utils/cut-time'
import { round2 } from '../../cutsheet/path'
import { measureCurves } from '../geometry'
import type { ClosedCurve, Point, Segment } from '../trace'
import { DEFAULT_MARKS } from './defaults'

/** The ring's band width as a fraction of its outer diameter. */
const RING_BAND_FRACTION = 0.14
/** The notch's width as a fraction of the outer diameter. */
const NOTCH_FRACTION = 0.18
/** The dot's radius as a fraction of the outer diameter. */
const DOT_FRACTION = 0.11

export interface MarkPlacement {
  /** Centre of the ring, mm, in the framed canvas. */
  x: number
  y: number
  /** Direction the notch opens towards (the design's centre), radians, y down. */
  notchAngle: number
}

const at = (cx: number, cy: number, r: number, t: number): Point => ({ x: cx + r * Math.cos(t), y: cy + r * Math.sin(t) })

/**
 * A circular arc from angle t0 to t1 as cubics of at most 90° each, control points at
 * k = 4/3 · tan(Δ/4) of the radius along the tangents (handbook Bézier geometry).
 */
function arc(cx: number, cy: number, r: number, t0: number, t1: number): Segment[] {
  const pieces = Math.max(1, Math.ceil(Math.abs(t1 - t0) / (Math.PI / 2) - 1e-9))
  const step = (t1 - t0) / pieces
  const k = (4 / 3) * Math.tan(step / 4) * r
  const out: Segment[] = []
  for (let i = 0; i < pieces; i++) {
    const a = t0 + i * step, b = a + step
    const from = at(cx, cy, r, a), to = at(cx, cy, r, b)
    out.push({
      kind: 'cubic', from,
      c1: { x: from.x - k * Math.sin(a), y: from.y + k * Math.cos(a) },
      c2: { x: to.x + k * Math.sin(b), y: to.y - k * Math.cos(b) },
      to,
    })
  }
  return out
}

/** One mark: the notched ring and the dot, as closed curves in mm. */
export function markShape(m: MarkPlacement, sizeMm: number): ClosedCurve[] {
  const R = sizeMm / 2
  const r = R - RING_BAND_FRACTION * sizeMm
  const half = (NOTCH_FRACTION * sizeMm) / 2
  // The notch's straight sides meet the outer circle at ±asin(half / R) from its axis, the inner at ±asin(half / r).
  const ao = Math.asin(half / R), ai = Math.asin(half / r)
  const t = m.notchAngle
  const outer = arc(m.x, m.y, R, t + ao, t + 2 * Math.PI - ao)
  const inner = arc(m.x, m.y, r, t + 2 * Math.PI - ai, t + ai)
  const ring: Segment[] = [
    ...outer,
    { kind: 'line', from: outer[outer.length - 1]!.to, to: inner[0]!.from },
    ...inner,
    { kind: 'line', from: inner[inner.length - 1]!.to, to: outer[0]!.from },
  ]
  const dot = arc(m.x, m.y, DOT_FRACTION * sizeMm, 0, 2 * Math.PI)
  return [{ sign: 1, segments: ring }, { sign: 1, segments: dot }]
}

/**
 * What `count` marks of the default size add to a layer's cut: for a layer stored before its
 * marks were measured with it (every such layer was framed with the default marks).
 */
export function defaultMarksCut(count: number): MarksCut {
  const one = measureCurves(markShape({ x: 0, y: 0, notchAngle: 0 }, DEFAULT_MARKS.sizeMm), 1)
  return { cutLengthMm: round2(one.cutLengthMm * count), outlines: (one.pieces + one.holes) * count }
}
