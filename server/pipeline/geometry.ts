// Measurements of an outline at its physical size, and the narrowest feature of a bitmap.
import { strokeSkeleton } from './skeleton'
import type { ClosedCurve, Point, Segment } from './trace'

// ---------------------------------------------------------------------------------------
// Area (Green's theorem)
//
// The area enclosed by a closed curve is A = ½ ∮ (x dy − y dx). For a straight segment
// P0→P1 the contribution is ½ (x0 y1 − x1 y0) (the shoelace term). For a cubic Bézier
// B(t) = Σ b_i(t) P_i with Bernstein polynomials b_i of degree 3, the contribution is
//   ½ ∫₀¹ (x y′ − y x′) dt = Σ_{i<j} K_ij (x_i y_j − x_j y_i),
//   K_ij = ½ ∫₀¹ (b_i b_j′ − b_j b_i′) dt,
// which gives K01 = 6/20, K02 = 3/20, K03 = 1/20, K12 = 3/20, K13 = 3/20, K23 = 6/20
// (integrals of polynomials, exact). In y-down pixel coordinates a positive value means the
// curve runs clockwise on screen.
// ---------------------------------------------------------------------------------------

const cross = (a: Point, b: Point) => a.x * b.y - b.x * a.y

export function segmentSignedArea(s: Segment): number {
  if (s.kind === 'line') return cross(s.from, s.to) / 2
  const p0 = s.from, p1 = s.c1, p2 = s.c2, p3 = s.to
  return (6 * cross(p0, p1) + 3 * cross(p0, p2) + cross(p0, p3)
    + 3 * cross(p1, p2) + 3 * cross(p1, p3) + 6 * cross(p2, p3)) / 20
}

export function curveSignedArea(curve: { segments: Segment[] }): number {
  let a = 0
  for (const s of curve.segments) a += segmentSignedArea(s)
  return a
}

// ---------------------------------------------------------------------------------------
// Length: lines exactly; cubics by adaptive Gauss–Legendre quadrature of |B′(t)|.
// An interval's 10-point estimate is accepted when it agrees with the sum of its two
// halves within LENGTH_TOLERANCE_PX (absolute, per interval; at most 24 halvings). The
// nodes and weights are computed here (Newton's method on the Legendre polynomial P10),
// not copied from a table.
// ---------------------------------------------------------------------------------------

/** Per-interval agreement required of the adaptive quadrature, in curve units. */
export const LENGTH_TOLERANCE = 1e-7

function gaussLegendre(n: number): { x: Float64Array, w: Float64Array } {
  const x = new Float64Array(n)
  const w = new Float64Array(n)
  for (let i = 0; i < n; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5))
    let dp = 0
    for (let iter = 0; iter < 100; iter++) {
      let p0 = 1, p1 = z
      for (let k = 2; k <= n; k++) { const p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k; p0 = p1; p1 = p2 }
      dp = (n * (z * p1 - p0)) / (z * z - 1)
      const dz = p1 / dp
      z -= dz
      if (Math.abs(dz) < 1e-16) break
    }
    let p0 = 1, p1 = z
    for (let k = 2; k <= n; k++) { const p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k; p0 = p1; p1 = p2 }
    dp = (n * (z * p1 - p0)) / (z * z - 1)
    x[i] = z
    w[i] = 2 / ((1 - z * z) * dp * dp)
  }
  return { x, w }
}

const GL = gaussLegendre(10)

function cubicSpeed(s: Extract<Segment, { kind: 'cubic' }>, t: number): number {
  const u = 1 - t
  const ax = 3 * u * u, bx = 6 * u * t, cx = 3 * t * t
  const dx = ax * (s.c1.x - s.from.x) + bx * (s.c2.x - s.c1.x) + cx * (s.to.x - s.c2.x)
  const dy = ax * (s.c1.y - s.from.y) + bx * (s.c2.y - s.c1.y) + cx * (s.to.y - s.c2.y)
  return Math.hypot(dx, dy)
}

function glInterval(s: Extract<Segment, { kind: 'cubic' }>, a: number, b: number): number {
  const h = (b - a) / 2, m = (a + b) / 2
  let sum = 0
  for (let i = 0; i < GL.x.length; i++) sum += GL.w[i]! * cubicSpeed(s, m + h * GL.x[i]!)
  return sum * h
}

function adaptive(s: Extract<Segment, { kind: 'cubic' }>, a: number, b: number, whole: number, depth: number, tol: number): number {
  const m = (a + b) / 2
  const left = glInterval(s, a, m)
  const right = glInterval(s, m, b)
  if (depth >= 24 || Math.abs(left + right - whole) <= tol) return left + right
  return adaptive(s, a, m, left, depth + 1, tol / 2) + adaptive(s, m, b, right, depth + 1, tol / 2)
}

export function segmentLength(s: Segment, tolerance = LENGTH_TOLERANCE): number {
  if (s.kind === 'line') return Math.hypot(s.to.x - s.from.x, s.to.y - s.from.y)
  return adaptive(s, 0, 1, glInterval(s, 0, 1), 0, tolerance)
}

export function curveLength(curve: { segments: Segment[] }): number {
  let l = 0
  for (const s of curve.segments) l += segmentLength(s)
  return l
}

// ---------------------------------------------------------------------------------------
// Outline measurements
// ---------------------------------------------------------------------------------------

export interface OutlineMeasurements {
  /** Ink area: outer curves add their enclosed area, holes subtract theirs. mm² */
  inkAreaMm2: number
  /** Cut length: the total length of every closed curve, outer and hole alike. mm */
  cutLengthMm: number
  /** Closed curves that bound ink from outside (outer boundaries of pieces). */
  pieces: number
  /** Closed curves that bound a hole in the ink. */
  holes: number
  /** Segments (lines and cubic Béziers) over all curves. */
  nodeCount: number
  /** Bounding box of all curves, mm (null when there is no ink). */
  bounds: { minX: number, minY: number, maxX: number, maxY: number } | null
}

/** End points of a segment and, for a cubic, its points where x′ = 0 or y′ = 0. */
function segmentExtremePoints(s: Segment): Point[] {
  if (s.kind === 'line') return [s.from, s.to]
  const out: Point[] = [s.from, s.to]
  const at = (t: number): Point => {
    const u = 1 - t
    return {
      x: u * u * u * s.from.x + 3 * u * u * t * s.c1.x + 3 * u * t * t * s.c2.x + t * t * t * s.to.x,
      y: u * u * u * s.from.y + 3 * u * u * t * s.c1.y + 3 * u * t * t * s.c2.y + t * t * t * s.to.y,
    }
  }
  for (const axis of ['x', 'y'] as const) {
    // B′(t)/3 = (d0 − 2d1 + d2) t² + 2 (d1 − d0) t + d0, with d_i = P_{i+1} − P_i
    const d0 = s.c1[axis] - s.from[axis], d1 = s.c2[axis] - s.c1[axis], d2 = s.to[axis] - s.c2[axis]
    const a = d0 - 2 * d1 + d2, b = 2 * (d1 - d0), c = d0
    const roots: number[] = []
    if (Math.abs(a) < 1e-12) { if (Math.abs(b) > 1e-12) roots.push(-c / b) } else {
      const disc = b * b - 4 * a * c
      if (disc >= 0) { const q = Math.sqrt(disc); roots.push((-b + q) / (2 * a), (-b - q) / (2 * a)) }
    }
    for (const t of roots) if (t > 0 && t < 1) out.push(at(t))
  }
  return out
}

/**
 * Measurements of curves given in pixels at pxPerMm (pass 1 for curves already in mm).
 * Uses each curve's sign to tell outer boundaries from holes (the traced outline has it).
 */
export function measureCurves(curves: ClosedCurve[], pxPerMm: number): OutlineMeasurements {
  let area = 0, length = 0, pieces = 0, holes = 0, nodes = 0
  let minX = Infinity, minY = Infinity, maxX = -Infinity, maxY = -Infinity
  for (const c of curves) {
    area += c.sign * Math.abs(curveSignedArea(c))
    length += curveLength(c)
    if (c.sign > 0) pieces++
    else holes++
    nodes += c.segments.length
    for (const s of c.segments) {
      for (const p of segmentExtremePoints(s)) {
        if (p.x < minX) minX = p.x
        if (p.y < minY) minY = p.y
        if (p.x > maxX) maxX = p.x
        if (p.y > maxY) maxY = p.y
      }
    }
  }
  const k = 1 / pxPerMm
  return {
    inkAreaMm2: area * k * k,
    cutLengthMm: length * k,
    pieces, holes,
    nodeCount: nodes,
    bounds: Number.isFinite(minX) ? { minX: minX * k, minY: minY * k, maxX: maxX * k, maxY: maxY * k } : null,
  }
}

export interface SmallPiece {
  /** Index of the piece's outer curve in the curve list. */
  index: number
  /** Area enclosed by the piece's outer boundary, mm². */
  areaMm2: number
}

/**
 * Pieces whose outer boundary encloses less than minAreaMm2 — too small to survive weeding.
 * (The enclosed area counts any holes of the piece as part of it: what is judged is the
 * size of the piece of film, not how much of it is left around its holes.)
 */
export function smallPieces(curves: ClosedCurve[], pxPerMm: number, minAreaMm2: number): SmallPiece[] {
  const k2 = 1 / (pxPerMm * pxPerMm)
  const out: SmallPiece[] = []
  curves.forEach((c, index) => {
    if (c.sign < 0) return
    const a = Math.abs(curveSignedArea(c)) * k2
    if (a < minAreaMm2) out.push({ index, areaMm2: a })
  })
  return out
}

// ---------------------------------------------------------------------------------------
// Narrowest stroke
// ---------------------------------------------------------------------------------------

export { distanceTransform, squaredDistanceTransform } from './distance'

export interface NarrowestFeature {
  widthPx: number
  widthMm: number
  /** A pixel (bitmap coordinates) where the narrowest width was found. */
  at: { x: number, y: number }
}

/**
 * Width of a stroke across a skeleton pixel of its body whose centre lies at squared distance
 * d2 from the nearest paper pixel's centre: twice that distance less half a pixel. (A stroke n
 * pixels across along an axis has its middle pixel at distance (n + 1)/2 when n is odd, and
 * two middle pixels at n/2 when n is even: n is 2D − 1 or 2D, and 2D − 0.5 is within half a
 * pixel of both.)
 */
export function strokeWidthPx(d2: number): number {
  return 2 * Math.sqrt(d2) - 0.5
}

/**
 * Width of a compact piece (a dot, a disc, a square) whose deepest pixel's centre lies at
 * squared distance d2 from the nearest paper pixel's centre: the diameter of the largest
 * inscribed disc, twice that distance plus half a pixel (the deepest point of the piece lies
 * between pixel centres, on average about 0.4 px from the nearest one, which reads that much
 * less).
 */
export function blobWidthPx(d2: number): number {
  return 2 * Math.sqrt(d2) + 0.5
}

/**
 * The narrowest stroke of the ink, by this definition (skeleton, stroke bodies and end tapers
 * as defined in skeleton.ts, pinholes read as ink; distances exact, between pixel centres,
 * outside the image counts as paper):
 *
 *   for each piece of ink, the smallest width (strokeWidthPx) over the skeleton pixels in the
 *   bodies of its strokes; for a piece whose skeleton is all taper (a dot, a disc, a square, a
 *   star: nothing in it is long compared with its width) the diameter of its largest inscribed
 *   disc (blobWidthPx), at its skeleton's deepest pixel. The narrowest stroke is the smallest
 *   of these over all pieces; null when there is no ink.
 *
 * So the width across the middle of a stroke counts at any angle, and so does every neck (a
 * narrowing between wider parts) however short, while the corners of shapes and the points of
 * stars and serifs, which narrow to nothing at their ends, do not. Widths are read at pixel
 * centres: within about a pixel and a half of the drawn width at any angle (checked in
 * geometry.test.ts). Time and memory are linear in the pixels (the taper search runs on the
 * skeleton only).
 *
 * Pass the bitmap that is actually cut — ideally the clean vector rasterised back (see
 * fidelity.ts) — so specks dropped by the speck filter do not count.
 */
export function narrowestFeature(bitmap: Uint8Array, width: number, height: number, pxPerMm: number): NarrowestFeature | null {
  const sk = strokeSkeleton(bitmap, width, height)
  if (sk.pixels.length === 0) return null
  const bodyMin = new Int32Array(sk.pieces).fill(-1) // skeleton pixel with the smallest body width
  const deepest = new Int32Array(sk.pieces).fill(-1) // skeleton pixel furthest from the paper
  for (let s = 0; s < sk.pixels.length; s++) {
    const p = sk.piece[s]!
    if (sk.body[s] && (bodyMin[p] === -1 || sk.d2[s]! < sk.d2[bodyMin[p]!]!)) bodyMin[p] = s
    if (deepest[p] === -1 || sk.d2[s]! > sk.d2[deepest[p]!]!) deepest[p] = s
  }
  let best = -1, widthPx = Infinity
  for (let p = 0; p < sk.pieces; p++) {
    const s = bodyMin[p] !== -1 ? bodyMin[p]! : deepest[p]!
    const w = bodyMin[p] !== -1 ? strokeWidthPx(sk.d2[s]!) : blobWidthPx(sk.d2[s]!)
    if (w < widthPx) { widthPx = w; best = s }
  }
  const i = sk.pixels[best]!
  return { widthPx, widthMm: widthPx / pxPerMm, at: { x: i % width, y: Math.floor(i / width) } }
}

/** The narrowest feature in mm (see narrowestFeature for the definition), null without ink. */
export function narrowestFeatureMm(bitmap: Uint8Array, width: number, height: number, pxPerMm: number): number | null {
  return narrowestFeature(bitmap, width, height, pxPerMm)?.widthMm ?? null
}
