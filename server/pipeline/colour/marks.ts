// Registration marks: the same small marks, at the same place, on every layer of a decal, so
// the cut films can be laid on each other in register.
//
// Our mark: a notched ring with a dot at its centre. The ring (outer diameter sizeMm, band
// RING_BAND_FRACTION of it) has a straight notch cut through it on the side facing the
// design's centre, so a layer turned or flipped shows at once; the dot marks the centre to
// line up by eye or with a pin. Three marks sit at three corners of the design's box (top
// left, top right, bottom left: an L, again so a turned sheet shows), each clearanceMm clear of
// the box. Every layer of one decal gets the same frame: the same canvas, the same shift of its
// drawing into that canvas, and the marks at the same coordinates.
import { flattenCurve, round2, type CutCurve } from '../../cutsheet/path'
import type { ClosedCurve, Point, Segment } from '../trace'
import { signedCurves, type Canvas } from './stack'
import { DEFAULT_MARKS, MARK_LIMITS, type MarkSettings } from './defaults'

export { DEFAULT_MARKS, MARK_LIMITS, type MarkSettings } from './defaults'
/** The ring's band width as a fraction of its outer diameter. */
const RING_BAND_FRACTION = 0.14
/** The notch's width as a fraction of the outer diameter. */
const NOTCH_FRACTION = 0.18
/** The dot's radius as a fraction of the outer diameter. */
const DOT_FRACTION = 0.11
/** Paper left around the marks on the canvas, mm. */
const CANVAS_MARGIN_MM = 1

export interface MarkPlacement {
  /** Centre of the ring, mm, in the framed canvas. */
  x: number
  y: number
  /** Direction the notch opens towards (the design's centre), radians, y down. */
  notchAngle: number
}

export interface RegistrationFrame {
  /** The canvas every layer is drawn on, marks included. */
  widthMm: number
  heightMm: number
  /** Added to every layer's coordinates to place its drawing in the framed canvas. */
  shift: Point
  /** The design's box in the framed canvas (the ink of every layer). */
  box: { x0: number, y0: number, x1: number, y1: number }
  marks: MarkPlacement[]
  settings: MarkSettings
}

function checkSettings(s: MarkSettings): MarkSettings {
  const inRange = (v: number, l: { min: number, max: number }) => typeof v === 'number' && v >= l.min && v <= l.max
  if (!inRange(s.clearanceMm, MARK_LIMITS.clearanceMm)) throw new RangeError(`The marks' clearance must be between ${MARK_LIMITS.clearanceMm.min} and ${MARK_LIMITS.clearanceMm.max} mm.`)
  if (!inRange(s.sizeMm, MARK_LIMITS.sizeMm)) throw new RangeError(`A mark's size must be between ${MARK_LIMITS.sizeMm.min} and ${MARK_LIMITS.sizeMm.max} mm.`)
  return s
}

/** The box holding every layer's ink (curves flattened within 0.01 mm), or null when there is none. */
export function designBox(layers: Array<{ curves: CutCurve[] }>): RegistrationFrame['box'] | null {
  let x0 = Infinity, y0 = Infinity, x1 = -Infinity, y1 = -Infinity
  for (const l of layers) {
    for (const c of l.curves) {
      for (const p of flattenCurve(c, 0.01)) {
        if (p.x < x0) x0 = p.x
        if (p.x > x1) x1 = p.x
        if (p.y < y0) y0 = p.y
        if (p.y > y1) y1 = p.y
      }
    }
  }
  return Number.isFinite(x0) ? { x0, y0, x1, y1 } : null
}

/**
 * The frame shared by every layer of one decal: where the marks go (outside the box of all the
 * layers' ink, clearanceMm clear of it), the canvas that holds drawing and marks, and the
 * drawing's shift into it (on the 0.01 mm grid). Marks off, or no ink: the canvas as it was.
 */
export function registrationFrame(layers: Array<{ curves: CutCurve[] }>, canvas: Canvas, settings: MarkSettings = DEFAULT_MARKS): RegistrationFrame {
  const box = designBox(layers)
  if (!settings.enabled || !box) {
    return { widthMm: canvas.widthMm, heightMm: canvas.heightMm, shift: { x: 0, y: 0 }, box: box ?? { x0: 0, y0: 0, x1: 0, y1: 0 }, marks: [], settings }
  }
  checkSettings(settings)
  const r = settings.sizeMm / 2
  const off = settings.clearanceMm + r
  const cx = (box.x0 + box.x1) / 2, cy = (box.y0 + box.y1) / 2
  const centres = [{ x: box.x0 - off, y: box.y0 - off }, { x: box.x1 + off, y: box.y0 - off }, { x: box.x0 - off, y: box.y1 + off }]
    .map((p) => ({ x: round2(p.x), y: round2(p.y) }))
  const reach = r + CANVAS_MARGIN_MM
  const left = Math.min(0, ...centres.map((p) => p.x - reach)), top = Math.min(0, ...centres.map((p) => p.y - reach))
  const right = Math.max(canvas.widthMm, ...centres.map((p) => p.x + reach)), bottom = Math.max(canvas.heightMm, ...centres.map((p) => p.y + reach))
  const shift = { x: round2(-left), y: round2(-top) }
  return {
    widthMm: round2(right + shift.x), heightMm: round2(bottom + shift.y),
    shift,
    box: { x0: box.x0 + shift.x, y0: box.y0 + shift.y, x1: box.x1 + shift.x, y1: box.y1 + shift.y },
    marks: centres.map((p) => ({ x: round2(p.x + shift.x), y: round2(p.y + shift.y), notchAngle: Math.atan2(cy - p.y, cx - p.x) })),
    settings,
  }
}

/** The marks' centres in the framed canvas, mm (empty when the marks are off). */
export function registrationMarkPositions(frame: RegistrationFrame): Point[] {
  return frame.marks.map((m) => ({ x: m.x, y: m.y }))
}

// ---------------------------------------------------------------------------------------
// The mark's shape, as exact lines and cubic arcs
// ---------------------------------------------------------------------------------------

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

/** Every mark of the frame as closed curves in mm (none when the marks are off). */
export function markCurves(frame: RegistrationFrame): ClosedCurve[] {
  return frame.marks.flatMap((m) => markShape(m, frame.settings.sizeMm))
}

function shifted<C extends CutCurve>(c: C, d: Point): C {
  const p = (q: Point): Point => ({ x: q.x + d.x, y: q.y + d.y })
  return {
    ...c,
    segments: c.segments.map((s) => s.kind === 'line'
      ? { kind: 'line', from: p(s.from), to: p(s.to) }
      : { kind: 'cubic', from: p(s.from), c1: p(s.c1), c2: p(s.c2), to: p(s.to) }),
  }
}

/** A layer's curves moved into the frame, with the marks added (signed: outer boundaries 1, holes −1). */
export function withRegistrationMarks(curves: Array<CutCurve | ClosedCurve>, frame: RegistrationFrame): ClosedCurve[] {
  const moved = signedCurves(curves).map((c) => shifted(c, frame.shift))
  return [...moved, ...markCurves(frame)]
}
