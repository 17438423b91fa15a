// One design made ready for a cut sheet, once, whatever the number of copies: its cut path
// (kerf-compensated or untouched), in cut order, as SVG path data and as polygons on the
// 0.01 mm grid, and its box.
//
// Kerf: the beam removes a strip about as wide as the kerf, centred on the path it follows.
// Cut along the drawn outline, every piece would come out half a kerf smaller all round and
// every hole half a kerf larger. So the beam's centre must follow the outline moved outwards
// by half the kerf around pieces and inwards into holes: the set of points within kerf / 2 of
// the inked region (a polygon offset with round joins, the shape a round beam spot sweeps).
// The offset is made on the outline flattened within the file tolerance (0.05 mm) and its
// round corners are chords whose vertices lie on the true arc and whose middles stray at most
// ARC_CHORD_FACTOR × KERF_ARC_TOLERANCE_MM (0.011 mm) inside it (see clipper.ts). Kerf 0 leaves the
// drawn curves exactly as they are (the SVG keeps its Bézier curves).
//
// Consequences worth knowing: a hole narrower than the kerf closes (the beam takes it out
// anyway), and pieces closer than the kerf merge into one outline.
//
// Cut order: smaller outlines first. An outline nested inside another always encloses less
// area, so every hole and every island is cut before the outline around it, while the film
// around it is still held (common practice: inner cuts first).
//
// The design's box: its drawn box (0…width × 0…height, in its own coordinates) grown by half
// the kerf on every side, which holds the compensated cut path (grown further in the rare case
// of an outline reaching past the drawn box). Packing, gaps, margins, weeding frames and
// labels are all measured from this box.
import { offsetRegion, signedArea } from './clipper'
import { FLATTEN_TOLERANCE_MM, flattenCurve, formatMm, round2, type CutCurve, type Point } from './path'

/** Arc tolerance given to Clipper for the kerf offset's round corners, mm. */
export const KERF_ARC_TOLERANCE_MM = 0.005
/** Widest kerf accepted, mm (diode lasers cut about 0.1–0.3 mm wide: common practice). */
export const MAX_KERF_MM = 2

export interface DesignSource {
  /** Letters, digits, '_', '.' and '-'; unique in a batch (it names the SVG definition dw-design-ID). */
  id: string
  /** Closed curves at the placed size, mm, y down, origin at the top-left of the drawn box. */
  curves: CutCurve[]
  widthMm: number
  heightMm: number
}

export interface Box { x0: number, y0: number, x1: number, y1: number }

export interface PreparedDesign {
  id: string
  widthMm: number
  heightMm: number
  kerfMm: number
  /** The drawn box grown by kerf / 2 (and to hold the whole cut path), in the design's own coordinates. */
  box: Box
  /** Path data of the cut path in the design's own coordinates (0.01 mm grid), cut order. */
  pathData: string
  /**
   * The cut path as closed polygons in hundredths of a millimetre (integers), in the design's
   * own coordinates, cut order; flat [x0, y0, x1, y1, …] arrays, the first vertex not repeated.
   */
  polygons: Int32Array[]
  /** The same polygons in mm, for geometry work (weeding lines). */
  polygonsMm: Point[][]
}

const ID_PATTERN = /^[A-Za-z0-9][A-Za-z0-9_.-]{0,63}$/

export function checkDesignId(id: unknown): string {
  if (typeof id !== 'string' || !ID_PATTERN.test(id)) {
    throw new RangeError(`A design id must be 1–64 letters, digits, '_', '.' or '-', starting with a letter or digit (got ${JSON.stringify(id)}).`)
  }
  return id
}

export function positiveMm(name: string, v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) throw new RangeError(`${name} must be a positive number of millimetres (got ${String(v)}).`)
  return v
}

export function checkKerf(v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v) || v < 0 || v > MAX_KERF_MM) {
    throw new RangeError(`The kerf must be between 0 and ${MAX_KERF_MM} mm (got ${String(v)}).`)
  }
  return v
}

/** The curve's control points on the 0.01 mm grid, as the files write them. */
function roundCurve(c: CutCurve): CutCurve {
  const p = (q: Point): Point => ({ x: round2(q.x), y: round2(q.y) })
  return {
    segments: c.segments.map((s) => s.kind === 'line'
      ? { kind: 'line', from: p(s.from), to: p(s.to) }
      : { kind: 'cubic', from: p(s.from), c1: p(s.c1), c2: p(s.c2), to: p(s.to) }),
  }
}

/** Path data of one closed curve, absolute, on the 0.01 mm grid. */
export function curvePathData(curve: CutCurve): string {
  const f = formatMm
  const s0 = curve.segments[0]!.from
  let d = `M${f(s0.x)} ${f(s0.y)}`
  const n = curve.segments.length
  curve.segments.forEach((s, i) => {
    // A final straight line back to the start is what Z draws anyway.
    if (i === n - 1 && i > 0 && s.kind === 'line' && f(s.to.x) === f(s0.x) && f(s.to.y) === f(s0.y)) return
    d += s.kind === 'line'
      ? `L${f(s.to.x)} ${f(s.to.y)}`
      : `C${f(s.c1.x)} ${f(s.c1.y)} ${f(s.c2.x)} ${f(s.c2.y)} ${f(s.to.x)} ${f(s.to.y)}`
  })
  return d + 'Z'
}

/** A polygon on the 0.01 mm grid as hundredths, without repeated vertices (nor a last equal to the first). */
function gridPolygon(points: Point[]): number[] {
  const out: number[] = []
  for (const q of points) {
    const x = Math.round(q.x * 100), y = Math.round(q.y * 100)
    const n = out.length
    if (n === 0 || out[n - 2] !== x || out[n - 1] !== y) out.push(x, y)
  }
  while (out.length > 2 && out[0] === out[out.length - 2] && out[1] === out[out.length - 1]) out.length -= 2
  return out
}

const hundredths = (v: number) => formatMm(v / 100)

function polygonPathData(poly: Int32Array): string {
  let d = `M${hundredths(poly[0]!)} ${hundredths(poly[1]!)}`
  for (let i = 2; i < poly.length; i += 2) d += `L${hundredths(poly[i]!)} ${hundredths(poly[i + 1]!)}`
  return d + 'Z'
}

function hundredthsToMm(poly: Int32Array): Point[] {
  const out: Point[] = []
  for (let i = 0; i < poly.length; i += 2) out.push({ x: poly[i]! / 100, y: poly[i + 1]! / 100 })
  return out
}

/** Indices ordered by enclosed area, smallest first (stable). */
function smallestFirst(polys: Point[][]): number[] {
  const area = polys.map((p) => Math.abs(signedArea(p)))
  return polys.map((_, i) => i).sort((a, b) => area[a]! - area[b]! || a - b)
}

/**
 * Prepares one design: checks it, compensates the kerf (0: untouched), orders the cut and
 * puts it on the 0.01 mm grid. `toleranceMm` is the chord tolerance for flattening curves.
 */
export function prepareDesign(source: DesignSource, kerfMm: number, toleranceMm = FLATTEN_TOLERANCE_MM): PreparedDesign {
  const id = checkDesignId(source.id)
  const w = positiveMm(`Design ${id}'s width`, source.widthMm)
  const h = positiveMm(`Design ${id}'s height`, source.heightMm)
  const kerf = checkKerf(kerfMm)
  if (!Array.isArray(source.curves) || source.curves.length === 0) throw new RangeError(`Design ${id} has no closed curves: there is nothing to cut.`)
  const curves = source.curves.map(roundCurve)
  const flat = curves.map((c) => flattenCurve(c, toleranceMm))
  let pathData: string
  let polygons: Int32Array[]
  if (kerf === 0) {
    const order = smallestFirst(flat)
    pathData = order.map((i) => curvePathData(curves[i]!)).join('')
    polygons = order.map((i) => gridPolygon(flat[i]!)).filter((p) => p.length >= 6).map((p) => Int32Array.from(p))
  } else {
    const offset = offsetRegion(flat, kerf / 2, KERF_ARC_TOLERANCE_MM)
    polygons = smallestFirst(offset).map((i) => gridPolygon(offset[i]!)).filter((p) => p.length >= 6).map((p) => Int32Array.from(p))
    pathData = polygons.map(polygonPathData).join('')
  }
  if (polygons.length === 0) throw new RangeError(`Design ${id} has nothing left to cut.`)
  // The box holds the drawn box grown by half the kerf and, should the outline reach past the
  // drawn box (a curve bulging over the bitmap's edge), the outline too; without kerf the SVG
  // keeps the curves, which may stray up to the chord tolerance beyond their flattened points.
  const half = kerf / 2
  const pad = kerf === 0 ? toleranceMm : 0
  let bx0 = Infinity, by0 = Infinity, bx1 = -Infinity, by1 = -Infinity
  for (const p of polygons) {
    for (let i = 0; i < p.length; i += 2) {
      const x = p[i]! / 100, y = p[i + 1]! / 100
      if (x < bx0) bx0 = x
      if (x > bx1) bx1 = x
      if (y < by0) by0 = y
      if (y > by1) by1 = y
    }
  }
  const low = half === 0 ? 0 : -half // not −0
  const box: Box = {
    x0: bx0 < low ? bx0 - pad : low, y0: by0 < low ? by0 - pad : low,
    x1: bx1 > w + half ? bx1 + pad : w + half, y1: by1 > h + half ? by1 + pad : h + half,
  }
  return { id, widthMm: w, heightMm: h, kerfMm: kerf, box, pathData, polygons, polygonsMm: polygons.map(hundredthsToMm) }
}
