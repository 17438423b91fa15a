// Planar homographies (3 × 3, row-major, acting on homogeneous column vectors) and image
// warping through them with bilinear sampling.
//
// The homography from four point pairs is the textbook direct linear transform: with h33 = 1,
// each pair (x, y) → (u, v) gives two linear equations
//   u = (h11 x + h12 y + h13) / (h31 x + h32 y + 1),  v = (h21 x + h22 y + h23) / (h31 x + h32 y + 1)
// so four pairs in general position (no three on a line) fix the eight unknowns. The points
// are first normalised (centroid to the origin, mean distance √2) so the 8 × 8 system is well
// conditioned at pixel coordinates in the thousands, and the result is denormalised.
//
// Pixel convention, as everywhere in the pipeline: pixel (i, j) covers [i, i+1] × [j, j+1];
// its centre is (i + ½, j + ½).

export interface Pt { x: number, y: number }
/** Row-major 3 × 3 matrix. */
export type Mat3 = [number, number, number, number, number, number, number, number, number]

export const IDENTITY: Mat3 = [1, 0, 0, 0, 1, 0, 0, 0, 1]

export function multiply(a: Mat3, b: Mat3): Mat3 {
  const r = new Array<number>(9).fill(0) as Mat3
  for (let i = 0; i < 3; i++) {
    for (let j = 0; j < 3; j++) r[i * 3 + j] = a[i * 3]! * b[j]! + a[i * 3 + 1]! * b[3 + j]! + a[i * 3 + 2]! * b[6 + j]!
  }
  return r
}

/** Inverse by the adjugate; scaled so that the bottom-right entry is 1 when it is not 0. */
export function invert(m: Mat3): Mat3 {
  const [a, b, c, d, e, f, g, h, i] = m
  const A = e * i - f * h, B = -(d * i - f * g), C = d * h - e * g
  const det = a * A + b * B + c * C
  if (!Number.isFinite(det) || Math.abs(det) < 1e-300) throw new RangeError('The transform cannot be inverted.')
  const inv: Mat3 = [
    A / det, -(b * i - c * h) / det, (b * f - c * e) / det,
    B / det, (a * i - c * g) / det, -(a * f - c * d) / det,
    C / det, -(a * h - b * g) / det, (a * e - b * d) / det,
  ]
  return normalise(inv)
}

/** The same transform with h33 = 1 (when h33 is not 0). */
export function normalise(m: Mat3): Mat3 {
  const s = m[8]
  if (Math.abs(s) < 1e-300) return m
  return m.map((v) => v / s) as Mat3
}

export function apply(m: Mat3, p: Pt): Pt {
  const w = m[6] * p.x + m[7] * p.y + m[8]
  return { x: (m[0] * p.x + m[1] * p.y + m[2]) / w, y: (m[3] * p.x + m[4] * p.y + m[5]) / w }
}

export function translation(dx: number, dy: number): Mat3 {
  return [1, 0, dx, 0, 1, dy, 0, 0, 1]
}

export function scaling(sx: number, sy = sx): Mat3 {
  return [sx, 0, 0, 0, sy, 0, 0, 0, 1]
}

/** Turn by `deg` degrees clockwise on screen (y down) about the origin. */
export function rotation(deg: number): Mat3 {
  const t = (deg * Math.PI) / 180
  const c = Math.cos(t), s = Math.sin(t)
  return [c, -s, 0, s, c, 0, 0, 0, 1]
}

function normalisation(pts: Pt[]): Mat3 {
  let cx = 0, cy = 0
  for (const p of pts) { cx += p.x; cy += p.y }
  cx /= pts.length; cy /= pts.length
  let d = 0
  for (const p of pts) d += Math.hypot(p.x - cx, p.y - cy)
  d /= pts.length
  const s = d > 0 ? Math.SQRT2 / d : 1
  return [s, 0, -s * cx, 0, s, -s * cy, 0, 0, 1]
}

/** Solve A x = b in place by Gaussian elimination with partial pivoting. */
function solve(A: number[][], b: number[]): number[] {
  const n = b.length
  for (let col = 0; col < n; col++) {
    let pivot = col
    for (let r = col + 1; r < n; r++) if (Math.abs(A[r]![col]!) > Math.abs(A[pivot]![col]!)) pivot = r
    if (Math.abs(A[pivot]![col]!) < 1e-12) throw new RangeError('The four points are degenerate (three of them lie on a line).')
    ;[A[col], A[pivot]] = [A[pivot]!, A[col]!]
    ;[b[col], b[pivot]] = [b[pivot]!, b[col]!]
    for (let r = col + 1; r < n; r++) {
      const f = A[r]![col]! / A[col]![col]!
      if (f === 0) continue
      for (let k = col; k < n; k++) A[r]![k]! -= f * A[col]![k]!
      b[r]! -= f * b[col]!
    }
  }
  const x = new Array<number>(n).fill(0)
  for (let r = n - 1; r >= 0; r--) {
    let s = b[r]!
    for (let k = r + 1; k < n; k++) s -= A[r]![k]! * x[k]!
    x[r] = s / A[r]![r]!
  }
  return x
}

/** True when some three of the four points lie on a line (relative to the points' spread). */
function hasThreeOnALine(p: readonly Pt[]): boolean {
  let spread = 0
  for (const a of p) for (const b of p) spread = Math.max(spread, Math.hypot(a.x - b.x, a.y - b.y))
  if (spread === 0) return true
  for (let i = 0; i < 4; i++) {
    const [a, b, c] = [0, 1, 2, 3].filter((k) => k !== i).map((k) => p[k]!)
    const area2 = Math.abs((b!.x - a!.x) * (c!.y - a!.y) - (c!.x - a!.x) * (b!.y - a!.y))
    if (area2 < 1e-9 * spread * spread) return true
  }
  return false
}

/** The homography mapping each of four points `from[i]` onto `to[i]`. */
export function homographyFromPoints(from: readonly Pt[], to: readonly Pt[]): Mat3 {
  if (from.length !== 4 || to.length !== 4) throw new RangeError('A homography needs exactly four point pairs.')
  if (hasThreeOnALine(from) || hasThreeOnALine(to)) throw new RangeError('The four points are degenerate (three of them lie on a line).')
  const Tf = normalisation([...from])
  const Tt = normalisation([...to])
  const f = from.map((p) => apply(Tf, p))
  const t = to.map((p) => apply(Tt, p))
  const A: number[][] = []
  const b: number[] = []
  for (let i = 0; i < 4; i++) {
    const { x, y } = f[i]!
    const { x: u, y: v } = t[i]!
    A.push([x, y, 1, 0, 0, 0, -u * x, -u * y]); b.push(u)
    A.push([0, 0, 0, x, y, 1, -v * x, -v * y]); b.push(v)
  }
  const h = solve(A, b)
  const Hn: Mat3 = [h[0]!, h[1]!, h[2]!, h[3]!, h[4]!, h[5]!, h[6]!, h[7]!, 1]
  // H = Tt⁻¹ · Hn · Tf
  return normalise(multiply(invert(Tt), multiply(Hn, Tf)))
}

export function isIdentity(m: Mat3, tolerance = 1e-12): boolean {
  const n = normalise(m)
  return n.every((v, i) => Math.abs(v - IDENTITY[i]!) <= tolerance)
}

/**
 * Resample an interleaved 8-bit image (`channels` per pixel) onto a dw × dh grid: output pixel
 * centre (u + ½, v + ½) is mapped by `outToIn` into the input, which is read there by
 * bilinear interpolation between the four nearest pixel centres. Points outside the input
 * take `fill` (one value per channel); within half a pixel of its edge the edge pixel is
 * repeated. With `within`, output points that this other map does not take into its
 * width × height rectangle take `fill` too (the corners a turn of a cut-out sheet uncovers).
 */
export function warpBilinear(
  src: Uint8Array, sw: number, sh: number, channels: number,
  outToIn: Mat3, dw: number, dh: number, fill: readonly number[],
  within?: { map: Mat3, width: number, height: number },
): Uint8Array {
  const out = new Uint8Array(dw * dh * channels)
  const [a, b, c, d, e, f, g, h, i] = outToIn
  const affine = g === 0 && h === 0
  const W = within?.map
  for (let v = 0; v < dh; v++) {
    const yc = v + 0.5
    for (let u = 0; u < dw; u++) {
      const xc = u + 0.5
      const w = affine ? i : g * xc + h * yc + i
      // input coordinates in "index space" (pixel centres at whole numbers)
      const x = (a * xc + b * yc + c) / w - 0.5
      const y = (d * xc + e * yc + f) / w - 0.5
      const o = (v * dw + u) * channels
      let outside = !(x > -1 && y > -1 && x < sw && y < sh)
      if (W && !outside) {
        const ww = W[6] * xc + W[7] * yc + W[8]
        const bx = (W[0] * xc + W[1] * yc + W[2]) / ww, by = (W[3] * xc + W[4] * yc + W[5]) / ww
        outside = !(bx >= 0 && by >= 0 && bx <= within!.width && by <= within!.height)
      }
      if (outside) {
        for (let k = 0; k < channels; k++) out[o + k] = fill[k]!
        continue
      }
      let x0 = Math.floor(x), y0 = Math.floor(y)
      let fx = x - x0, fy = y - y0
      if (x0 < 0) { x0 = 0; fx = 0 } else if (x0 >= sw - 1) { x0 = sw - 1; fx = 0 }
      if (y0 < 0) { y0 = 0; fy = 0 } else if (y0 >= sh - 1) { y0 = sh - 1; fy = 0 }
      const x1 = fx > 0 ? x0 + 1 : x0
      const y1 = fy > 0 ? y0 + 1 : y0
      const p00 = (y0 * sw + x0) * channels, p10 = (y0 * sw + x1) * channels
      const p01 = (y1 * sw + x0) * channels, p11 = (y1 * sw + x1) * channels
      const w00 = (1 - fx) * (1 - fy), w10 = fx * (1 - fy), w01 = (1 - fx) * fy, w11 = fx * fy
      for (let k = 0; k < channels; k++) {
        out[o + k] = Math.round(src[p00 + k]! * w00 + src[p10 + k]! * w10 + src[p01 + k]! * w01 + src[p11 + k]! * w11)
      }
    }
  }
  return out
}

/**
 * warpBilinear for a one-channel image and a map that only scales and shifts each axis
 * (x_in = sx · x_out + tx, likewise y): the same sampling, with the weights worked out once
 * per column and per row.
 */
export function scaleBilinear(src: Uint8Array, sw: number, sh: number, outToIn: Mat3, dw: number, dh: number): Uint8Array {
  const out = new Uint8Array(dw * dh)
  scaleBilinearRows(src, sw, sh, outToIn, dw, dh, (v, row) => out.set(row, v * dw))
  return out
}

/**
 * scaleBilinear handing over one output row at a time (the same buffer each time, valid during
 * the call), so a caller that only reads the scaled image once need not hold all of it.
 */
export function scaleBilinearRows(src: Uint8Array, sw: number, sh: number, outToIn: Mat3, dw: number, dh: number, take: (v: number, row: Uint8Array) => void): void {
  const [sx, b, tx, d, sy, ty, g, h] = outToIn
  if (b !== 0 || d !== 0 || g !== 0 || h !== 0) throw new RangeError('scaleBilinear takes a scale and a shift only.')
  const axis = (n: number, s: number, t: number, size: number) => {
    const i0 = new Int32Array(n), i1 = new Int32Array(n), f = new Float64Array(n)
    for (let u = 0; u < n; u++) {
      let x = s * (u + 0.5) + t - 0.5
      if (x < 0) x = 0
      if (x > size - 1) x = size - 1
      const a = Math.floor(x)
      i0[u] = a; i1[u] = Math.min(size - 1, a + 1); f[u] = x - a
    }
    return { i0, i1, f }
  }
  const X = axis(dw, sx, tx, sw), Y = axis(dh, sy, ty, sh)
  const row = new Uint8Array(dw)
  // Each source row interpolated across once, and kept while output rows still read it: an
  // enlargement reads the same pair of rows for several output rows in turn.
  let rowA = -1, rowB = -1
  let bufA = new Float64Array(dw), bufB = new Float64Array(dw)
  const across = (r: number, buf: Float64Array) => {
    const base = r * sw
    for (let u = 0; u < dw; u++) {
      const a = src[base + X.i0[u]!]!
      buf[u] = a + (src[base + X.i1[u]!]! - a) * X.f[u]!
    }
  }
  for (let v = 0; v < dh; v++) {
    const r0 = Y.i0[v]!, r1 = Y.i1[v]!, fy = Y.f[v]!
    if (rowA !== r0) {
      if (rowB === r0) { const t = bufA; bufA = bufB; bufB = t; rowB = rowA; rowA = r0 } else { across(r0, bufA); rowA = r0 }
    }
    if (rowB !== r1) { across(r1, bufB); rowB = r1 }
    for (let u = 0; u < dw; u++) {
      const top = bufA[u]!
      row[u] = Math.round(top + (bufB[u]! - top) * fy)
    }
    take(v, row)
  }
}
