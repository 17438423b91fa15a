// Measurements of an outline at its physical size, and the narrowest feature of a bitmap.
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
// Exact Euclidean distance transform with nearest-paper feature
// (P. F. Felzenszwalb and D. P. Huttenlocher, "Distance Transforms of Sampled Functions",
// Theory of Computing 8 (2012) 415–428: the 1-D squared-distance transform as the lower
// envelope of parabolas, applied to columns and then to rows, is exact in 2-D.)
// ---------------------------------------------------------------------------------------

/**
 * 1-D squared distance transform of f[0…n-1] (FH 2012, algorithm DT(f)), also reporting for
 * each q the index of the sample whose parabola is lowest there.
 */
function dt1d(f: Float64Array, n: number, d: Float64Array, arg: Int32Array, v: Int32Array, z: Float64Array): void {
  let k = 0
  v[0] = 0
  z[0] = -Infinity
  z[1] = Infinity
  for (let q = 1; q < n; q++) {
    let vk = v[k]!
    let s = ((f[q]! + q * q) - (f[vk]! + vk * vk)) / (2 * q - 2 * vk)
    while (s <= z[k]!) { // z[0] = −∞ ends the loop at k = 0
      k--
      vk = v[k]!
      s = ((f[q]! + q * q) - (f[vk]! + vk * vk)) / (2 * q - 2 * vk)
    }
    k++
    v[k] = q
    z[k] = s
    z[k + 1] = Infinity
  }
  k = 0
  for (let q = 0; q < n; q++) {
    while (z[k + 1]! < q) k++
    const vk = v[k]!
    d[q] = (q - vk) * (q - vk) + f[vk]!
    arg[q] = vk
  }
}

export interface FeatureTransform {
  /** Padded size: the bitmap with a one-pixel paper frame (outside the image is paper). */
  width: number
  height: number
  /** For each padded pixel: x and y of the nearest paper pixel (padded coordinates). */
  featureX: Int32Array
  featureY: Int32Array
}

/** Nearest paper pixel of every pixel of a 1-bit bitmap (1 = ink), exactly, in O(pixels). */
export function featureTransform(bitmap: Uint8Array, width: number, height: number): FeatureTransform {
  const W = width + 2, H = height + 2
  const ink = (x: number, y: number) => x >= 1 && y >= 1 && x <= width && y <= height && bitmap[(y - 1) * width + (x - 1)] === 1
  // "Infinitely far" for ink samples in the column pass: larger than any squared distance in
  // the image, yet small enough that every sum stays an exactly representable integer.
  const FAR = 4 * (W + H) * (W + H)
  const rowOf = new Int32Array(W * H) // nearest paper row within the column
  const n = Math.max(W, H)
  const f = new Float64Array(n), d = new Float64Array(n), z = new Float64Array(n + 1)
  const arg = new Int32Array(n), v = new Int32Array(n)
  for (let x = 0; x < W; x++) {
    for (let y = 0; y < H; y++) f[y] = ink(x, y) ? FAR : 0
    dt1d(f, H, d, arg, v, z)
    for (let y = 0; y < H; y++) rowOf[y * W + x] = arg[y]!
  }
  const featureX = new Int32Array(W * H)
  const featureY = new Int32Array(W * H)
  for (let y = 0; y < H; y++) {
    const base = y * W
    for (let x = 0; x < W; x++) { const r = rowOf[base + x]! - y; f[x] = r * r }
    dt1d(f, W, d, arg, v, z)
    for (let x = 0; x < W; x++) {
      const fx = arg[x]!
      featureX[base + x] = fx
      featureY[base + x] = rowOf[base + fx]!
    }
  }
  return { width: W, height: H, featureX, featureY }
}

/** Euclidean distance from each pixel centre to the nearest paper pixel centre (0 on paper). */
export function distanceTransform(bitmap: Uint8Array, width: number, height: number): Float64Array {
  const ft = featureTransform(bitmap, width, height)
  const out = new Float64Array(width * height)
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = (y + 1) * ft.width + (x + 1)
      out[y * width + x] = Math.hypot(ft.featureX[i]! - (x + 1), ft.featureY[i]! - (y + 1))
    }
  }
  return out
}

export interface NarrowestFeature {
  widthPx: number
  widthMm: number
  /** A pixel (bitmap coordinates) where the narrowest width was found. */
  at: { x: number, y: number }
}

/**
 * Narrowest feature of the ink, by this definition:
 *
 * For two 8-adjacent ink pixels p and q = p + e (e one of the four directions →, ↓, ↘, ↗),
 * let f(p), f(q) be their nearest paper pixels (exact feature transform above) and
 * d_p = |f(p) − p|, d_q = |f(q) − q|. The ink's medial axis crosses between p and q — p's
 * nearest paper lies behind p, q's beyond q, on opposite walls — when
 *   (a) f(p) − p points along −e and f(q) − q along +e, each within 36.87° (cosine ≥ 0.8), and
 *   (b) |f(p) − f(q)| ≥ 1.6 × max(d_p, d_q) (the two walls' nearest points are far apart).
 * The local width across the axis there is d_p + d_q + |e|·(cos_p + cos_q)/2 − 1 pixels: the
 * distance between the two nearest paper pixel centres measured across the axis, less the
 * half pixel by which each paper centre lies outside its wall. Because every direction is
 * within 22.5° of one of the four axes, each stretch of a stroke is seen by some pair.
 * The conditions drop the axis branches that run into convex corners (a right-angle corner
 * has its two nearest walls at 90°, outside the cone) and the pixel steps of a slanted edge,
 * which are not narrow parts.
 * An ink pixel whose two neighbours along one axis are paper while both neighbours along the
 * other axis are ink lies inside a line one pixel wide: width 1 pixel.
 *
 * A width w found at p counts when it is a narrow PART of the ink, not the taper of a point:
 * going k = max(4, round(1.5 w)) pixels along the axis from p in both directions, the axis goes
 * on with widths of at least w − 0.5 px (a stroke of even width, or a neck — the narrowest
 * place between wider parts). Near a pointed tip the width keeps shrinking towards the tip,
 * so tips are not reported (a needle-thin spike still is, once it is nearly parallel-sided).
 * A compact blob (a dot, a disc) has no axis to follow: its width counts at its thickest
 * point, where no ink pixel within k pixels is more than 0.75 px further from the paper than
 * the deeper pixel of the pair.
 *
 * The narrowest feature is the smallest counted width over the whole bitmap; outside the image
 * counts as paper. If nothing counts (a star's points around its core, a single speck), the
 * diameter of the largest disc inside the ink, 2·max(distance) − 1 px. For a straight stroke of whole-pixel width along an axis it is exact; for
 * other directions within about one pixel. null when there is no ink.
 *
 * Pass the bitmap that is actually cut — ideally the clean vector rasterised back (see
 * fidelity.ts) — so specks dropped by the speck filter do not count.
 */
const DIRS = [1, 0, 0, 1, 1, 1, 1, -1]
/** For each of DIRS, the direction along the axis (perpendicular to it). */
const ALONG = [0, 1, 1, 0, 1, -1, 1, 1]
/** Pixel noise allowed when comparing widths along the axis. */
const SLACK = 0.5
/** cos 36.87°: a direction within this angle of the pair's axis counts as "along" it. */
const CONE_COS = 0.8

export function narrowestFeature(bitmap: Uint8Array, width: number, height: number, pxPerMm: number): NarrowestFeature | null {
  const ft = featureTransform(bitmap, width, height)
  const W = ft.width
  const FX = ft.featureX, FY = ft.featureY
  const isInk = (x: number, y: number) => x >= 0 && y >= 0 && x < width && y < height && bitmap[y * width + x] === 1
  // Pass 1: local width across the axis at every pixel where the axis is crossed.
  const widthAt = new Float32Array(width * height).fill(Infinity)
  const dirAt = new Int8Array(width * height)
  const depthAt = new Float32Array(width * height) // max(d_p, d_q) of the pair that gave the width
  const ridge: number[] = []
  let anyInk = false
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x
      if (bitmap[i] !== 1) continue
      anyInk = true
      const ip = (y + 1) * W + (x + 1)
      const px = x + 1, py = y + 1
      const fpx = FX[ip]!, fpy = FY[ip]!
      const vpx = fpx - px, vpy = fpy - py
      const dp = Math.hypot(vpx, vpy)
      let best = Infinity, bestDir = 0, bestDepth = 0
      for (let dir = 0; dir < 4; dir++) {
        const ex = DIRS[dir * 2]!, ey = DIRS[dir * 2 + 1]!
        if (!isInk(x + ex, y + ey)) continue
        const len = dir < 2 ? 1 : Math.SQRT2
        const iq = ip + ey * W + ex
        const fqx = FX[iq]!, fqy = FY[iq]!
        const vqx = fqx - (px + ex), vqy = fqy - (py + ey)
        const dq = Math.hypot(vqx, vqy)
        // (a) cosines of the angles between each pixel's way to its nearest paper and the axis
        const cp = -(vpx * ex + vpy * ey) / (len * dp)
        const cq = (vqx * ex + vqy * ey) / (len * dq)
        if (!(cp >= CONE_COS) || !(cq >= CONE_COS)) continue
        // (b) the two nearest paper pixels far enough apart
        const sep = Math.hypot(fpx - fqx, fpy - fqy)
        if (sep < 1.6 * Math.max(dp, dq)) continue
        const w = dp + dq + (len * (cp + cq)) / 2 - 1
        if (w < best) { best = w; bestDir = dir; bestDepth = Math.max(dp, dq) }
      }
      // a line one pixel wide
      if (!isInk(x - 1, y) && !isInk(x + 1, y) && isInk(x, y - 1) && isInk(x, y + 1)) { best = 1; bestDir = 0; bestDepth = 1 }
      else if (!isInk(x, y - 1) && !isInk(x, y + 1) && isInk(x - 1, y) && isInk(x + 1, y)) { best = 1; bestDir = 1; bestDepth = 1 }
      if (best < Infinity) { widthAt[i] = best; dirAt[i] = bestDir; depthAt[i] = bestDepth; ridge.push(i) }
    }
  }
  if (!anyInk) return null

  // Largest width found in the 3 × 3 pixels around (cx, cy).
  const widest3 = (cx: number, cy: number) => {
    let m = -Infinity
    for (let yy = cy - 1; yy <= cy + 1; yy++) {
      if (yy < 0 || yy >= height) continue
      for (let xx = cx - 1; xx <= cx + 1; xx++) {
        if (xx < 0 || xx >= width) continue
        const v = widthAt[yy * width + xx]!
        if (v < Infinity && v > m) m = v
      }
    }
    return m
  }
  const distAt = (x: number, y: number) => {
    const i = (y + 1) * W + (x + 1)
    return Math.hypot(FX[i]! - (x + 1), FY[i]! - (y + 1))
  }
  // Pass 2: keep widths that are real narrow parts, not the taper of a pointed tip.
  let best = Infinity, bx = -1, by = -1
  for (const i of ridge) {
    const w = widthAt[i]!
    const x = i % width, y = (i - x) / width
    if (w >= best) continue
    const dir = dirAt[i]!
    const tx = ALONG[dir * 2]!, ty = ALONG[dir * 2 + 1]!
    const k = Math.max(4, Math.round(1.5 * w))
    const ahead = widest3(x + k * tx, y + k * ty)
    const behind = widest3(x - k * tx, y - k * ty)
    let keep = ahead >= w - SLACK && behind >= w - SLACK
    if (!keep) {
      // the thickest point of a compact blob: no ink within k pixels lies deeper inside the ink
      keep = true
      const deepest = depthAt[i]! + 0.75
      for (let yy = Math.max(0, y - k); yy <= Math.min(height - 1, y + k) && keep; yy++) {
        for (let xx = Math.max(0, x - k); xx <= Math.min(width - 1, x + k); xx++) {
          if (bitmap[yy * width + xx] === 1 && distAt(xx, yy) > deepest) { keep = false; break }
        }
      }
    }
    if (keep) { best = w; bx = x; by = y }
  }
  if (!Number.isFinite(best)) {
    // Nothing counted (only tapers around a core, or single specks): the diameter of the
    // largest disc that fits in the ink, 2·max(distance) − 1 px.
    let dMax = 0, mx = 0, my = 0
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        if (bitmap[y * width + x] !== 1) continue
        const d = distAt(x, y)
        if (d > dMax) { dMax = d; mx = x; my = y }
      }
    }
    const w = Math.max(1, 2 * dMax - 1)
    return { widthPx: w, widthMm: w / pxPerMm, at: { x: mx, y: my } }
  }
  return { widthPx: best, widthMm: best / pxPerMm, at: { x: bx, y: by } }
}

/** The narrowest feature in mm (see narrowestFeature for the definition), null without ink. */
export function narrowestFeatureMm(bitmap: Uint8Array, width: number, height: number, pxPerMm: number): number | null {
  return narrowestFeature(bitmap, width, height, pxPerMm)?.widthMm ?? null
}
