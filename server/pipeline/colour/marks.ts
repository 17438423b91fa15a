// Registration marks: the same small marks, at the same place, on every layer of a decal, so
// the cut films can be laid on each other in register.
//
// Our mark (its shape in mark-shape.ts): a notched ring with a dot at its centre. The ring (outer diameter sizeMm, band
// RING_BAND_FRACTION of it) has a straight notch cut through it on the side facing the
// design's centre, so a layer turned or flipped shows at once; the dot marks the centre to
// line up by eye or with a pin. Three marks sit at three corners of the design's box (top
// left, top right, bottom left: an L, again so a turned sheet shows), each clearanceMm clear of
// the box. Every layer of one decal gets the same frame: the same canvas, the same shift of its
// drawing into that canvas, and the marks at the same coordinates.
import type { MarksCut } from '../../../shared/utils/cut-time'
import { flattenCurve, round2, type CutCurve } from '../../cutsheet/path'
import { measureCurves } from '../geometry'
import type { ClosedCurve, Point } from '../trace'
import { signedCurves, type Canvas } from './stack'
import { DEFAULT_MARKS, MARK_LIMITS, type MarkSettings } from './defaults'
import { markShape, type MarkPlacement } from './mark-shape'

export { DEFAULT_MARKS, MARK_LIMITS, type MarkSettings } from './defaults'
export { defaultMarksCut, markShape, type MarkPlacement } from './mark-shape'

/** Paper left around the marks on the canvas, mm. */
const CANVAS_MARGIN_MM = 1

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

/** Every mark of the frame as closed curves in mm (none when the marks are off). */
export function markCurves(frame: RegistrationFrame): ClosedCurve[] {
  return frame.marks.flatMap((m) => markShape(m, frame.settings.sizeMm))
}

/** What the marks add to every layer's cut: their outlines' length (mm) and count, measured as a layer's are. */
export function marksCut(frame: RegistrationFrame): MarksCut {
  const m = measureCurves(markCurves(frame), 1)
  return { cutLengthMm: round2(m.cutLengthMm), outlines: m.pieces + m.holes }
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
