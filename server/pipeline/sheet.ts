// The sheet of paper in a photo: its four corners, and the rectangle it really is.
//
// Finding the corners (on a shrunk copy's luma):
//  1. on a half-size copy, Otsu's threshold: the sheet is the largest light piece, grown into
//     its softly shadowed parts, at least a sixth of the picture, and it must not fill the
//     picture (then there are no corners to see: a scan, or a close-up);
//  2. its convex hull (so a drawing on the sheet, or a shadow biting into one edge, does not
//     matter), and the four hull points enclosing the largest quadrilateral;
//  3. each side refined to sub-pixel accuracy: along lines across the coarse side, the place
//     where the brightness crosses half-way between sheet and background; a straight line is
//     fitted through those places by total least squares, twice dropping the far-off ones;
//     the corners are where neighbouring lines meet.
//
// The rectangle: a photo shows the sheet's sides shortened by perspective, so their lengths
// in the picture do not give its proportions. With a pinhole camera whose principal point is
// the picture's centre and whose pixels are square, the homography from the unit square to
// the photographed quadrilateral is H ∝ K [w·r1, h·r2, t] (r1, r2 orthonormal, K the camera
// matrix with focal length f). So K⁻¹h1 ⊥ K⁻¹h2 gives f, and w / h = |K⁻¹h1| / |K⁻¹h2|
// (Z. Zhang, L.-W. He, "Whiteboard scanning and image enhancement", Digital Signal Processing
// 17 (2007) 414–432). When the sheet is seen nearly square-on, f cannot be solved for; it
// hardly matters then, and a typical phone camera's f (0.8 × the long side, from memory) is used.
import { homographyFromPoints, multiply, translation, type Mat3, type Pt } from './homography'
import { findPieces } from './components'
import { histogram, otsuThreshold } from './otsu'
import { halveGrey } from './rawgrey'

export type Quad = [Pt, Pt, Pt, Pt]

function cross(o: Pt, a: Pt, b: Pt): number {
  return (a.x - o.x) * (b.y - o.y) - (a.y - o.y) * (b.x - o.x)
}

/** Convex hull, clockwise on screen (y down), by the monotone chain. */
export function convexHull(points: Pt[]): Pt[] {
  const p = [...points].sort((a, b) => a.x - b.x || a.y - b.y)
  if (p.length < 3) return p
  const lower: Pt[] = []
  for (const q of p) {
    while (lower.length >= 2 && cross(lower[lower.length - 2]!, lower[lower.length - 1]!, q) <= 0) lower.pop()
    lower.push(q)
  }
  const upper: Pt[] = []
  for (let i = p.length - 1; i >= 0; i--) {
    const q = p[i]!
    while (upper.length >= 2 && cross(upper[upper.length - 2]!, upper[upper.length - 1]!, q) <= 0) upper.pop()
    upper.push(q)
  }
  upper.pop(); lower.pop()
  return lower.concat(upper)
}

export function polygonArea(p: readonly Pt[]): number {
  let a = 0
  for (let i = 0; i < p.length; i++) {
    const q = p[i]!, r = p[(i + 1) % p.length]!
    a += q.x * r.y - r.x * q.y
  }
  return Math.abs(a) / 2
}

/** Four hull vertices enclosing the largest quadrilateral (coordinate ascent from two starts). */
function largestQuad(hull: Pt[]): number[] {
  const n = hull.length
  const area = (ix: number[]) => polygonArea(ix.map((i) => hull[i]!))
  const extreme = (f: (p: Pt) => number) => { let b = 0; for (let i = 1; i < n; i++) if (f(hull[i]!) > f(hull[b]!)) b = i; return b }
  const starts = [
    [extreme((p) => -p.x - p.y), extreme((p) => p.x - p.y), extreme((p) => p.x + p.y), extreme((p) => -p.x + p.y)],
    [extreme((p) => -p.x), extreme((p) => -p.y), extreme((p) => p.x), extreme((p) => p.y)],
  ]
  let best: number[] = starts[0]!, bestArea = -1
  for (const s of starts) {
    const ix = [...s].sort((a, b) => a - b)
    if (new Set(ix).size < 4) continue
    let improved = true
    for (let round = 0; improved && round < 20; round++) {
      improved = false
      for (let k = 0; k < 4; k++) {
        const prev = ix[(k + 3) % 4]!, next = ix[(k + 1) % 4]!
        let bestI = ix[k]!, bestA = area(ix)
        for (let i = (prev + 1) % n; i !== next; i = (i + 1) % n) {
          const trial = [...ix]; trial[k] = i
          const a = area(trial)
          if (a > bestA + 1e-9) { bestA = a; bestI = i }
        }
        if (bestI !== ix[k]) { ix[k] = bestI; improved = true }
      }
    }
    const a = area(ix)
    if (a > bestArea) { bestArea = a; best = ix }
  }
  return best
}

function sample(img: Uint8Array, w: number, h: number, x: number, y: number): number {
  const xi = Math.min(w - 1, Math.max(0, x - 0.5)), yi = Math.min(h - 1, Math.max(0, y - 0.5))
  const x0 = Math.floor(xi), y0 = Math.floor(yi)
  const x1 = Math.min(w - 1, x0 + 1), y1 = Math.min(h - 1, y0 + 1)
  const fx = xi - x0, fy = yi - y0
  return (img[y0 * w + x0]! * (1 - fx) + img[y0 * w + x1]! * fx) * (1 - fy) + (img[y1 * w + x0]! * (1 - fx) + img[y1 * w + x1]! * fx) * fy
}

interface Line { /** unit normal */ nx: number, ny: number, /** n · p = c */ c: number }

function fitLine(points: Pt[]): Line | null {
  if (points.length < 6) return null
  let pts = points
  let line: Line | null = null
  for (let round = 0; round < 3; round++) {
    let mx = 0, my = 0
    for (const p of pts) { mx += p.x; my += p.y }
    mx /= pts.length; my /= pts.length
    let sxx = 0, syy = 0, sxy = 0
    for (const p of pts) { const dx = p.x - mx, dy = p.y - my; sxx += dx * dx; syy += dy * dy; sxy += dx * dy }
    // normal = eigenvector of the scatter matrix with the smaller eigenvalue
    const theta = 0.5 * Math.atan2(2 * sxy, sxx - syy) // direction of the line
    const nx = -Math.sin(theta), ny = Math.cos(theta)
    line = { nx, ny, c: nx * mx + ny * my }
    const res = pts.map((p) => Math.abs(nx * p.x + ny * p.y - line!.c))
    const sorted = [...res].sort((a, b) => a - b)
    const limit = Math.max(0.75, 2.5 * sorted[Math.floor(sorted.length / 2)]!)
    const kept = pts.filter((_, i) => res[i]! <= limit)
    if (kept.length < 6 || kept.length === pts.length) break
    pts = kept
  }
  return line
}

function intersect(a: Line, b: Line): Pt | null {
  const det = a.nx * b.ny - a.ny * b.nx
  if (Math.abs(det) < 1e-9) return null
  return { x: (a.c * b.ny - a.ny * b.c) / det, y: (a.nx * b.c - a.c * b.nx) / det }
}

/**
 * Grow the sheet's piece into neighbours that differ little from it (a soft shadow across
 * the paper changes its brightness slowly; the paper's edge is a step), so a shadow does not
 * bite into the sheet. Pixels of other pieces are taken over too; nothing darker than `floor`
 * (where the background begins, and ink: a tapering stroke or a blurred corner would
 * otherwise make a gentle slope into them).
 */
function growSoftly(img: Uint8Array, w: number, h: number, labels: Int32Array, id: number, floor: number): void {
  const step = 10
  const queue = new Int32Array(w * h)
  let head = 0, tail = 0
  for (let i = 0; i < labels.length; i++) if (labels[i] === id) queue[tail++] = i
  const visit = (j: number, v: number) => {
    if (labels[j] === id) return
    const u = img[j]!
    if (u >= floor && u - v <= step && v - u <= step) { labels[j] = id; queue[tail++] = j }
  }
  while (head < tail) {
    const i = queue[head++]!
    const x = i % w, v = img[i]!
    if (x > 0) visit(i - 1, v)
    if (x < w - 1) visit(i + 1, v)
    if (i >= w) visit(i - w, v)
    if (i < w * (h - 1)) visit(i + w, v)
  }
}

/** Sub-pixel points of the sheet's edge near the side from a to b (outward away from `centre`). */
function edgePoints(img: Uint8Array, w: number, h: number, a: Pt, b: Pt, centre: Pt): Pt[] {
  const len = Math.hypot(b.x - a.x, b.y - a.y)
  const tx = (b.x - a.x) / len, ty = (b.y - a.y) / len
  let nx = -ty, ny = tx
  const mid = { x: (a.x + b.x) / 2, y: (a.y + b.y) / 2 }
  if (nx * (mid.x - centre.x) + ny * (mid.y - centre.y) < 0) { nx = -nx; ny = -ny }
  const reach = Math.max(6, 0.03 * len)
  const steps = Math.ceil(reach * 4)
  const out: Pt[] = []
  const samples = Math.min(120, Math.max(20, Math.round(len / 3)))
  const prof = new Float64Array(2 * steps + 1)
  for (let s = 0; s < samples; s++) {
    const t = 0.1 + (0.8 * s) / (samples - 1)
    const px = a.x + tx * len * t, py = a.y + ty * len * t
    for (let k = -steps; k <= steps; k++) {
      const d = (k / steps) * reach
      prof[k + steps] = sample(img, w, h, px + nx * d, py + ny * d)
    }
    const inner = [...prof.slice(0, Math.floor(steps / 2))].sort((p, q) => p - q)
    const outer = [...prof.slice(prof.length - Math.floor(steps / 2))].sort((p, q) => p - q)
    const lin = inner[inner.length >> 1]!, lout = outer[outer.length >> 1]!
    if (lin - lout < 20) continue
    const half = (lin + lout) / 2
    // the crossing nearest the coarse side
    let best: number | null = null
    for (let k = 0; k + 1 < prof.length; k++) {
      const p0 = prof[k]!, p1 = prof[k + 1]!
      if (p0 >= half && p1 < half) {
        const f = (p0 - half) / (p0 - p1)
        const d = ((k - steps + f) / steps) * reach
        if (best === null || Math.abs(d) < Math.abs(best)) best = d
      }
    }
    if (best !== null) out.push({ x: px + nx * best, y: py + ny * best })
  }
  return out
}

function interiorAngles(q: readonly Pt[]): number[] {
  return q.map((p, i) => {
    const a = q[(i + 3) % 4]!, b = q[(i + 1) % 4]!
    const v1 = { x: a.x - p.x, y: a.y - p.y }, v2 = { x: b.x - p.x, y: b.y - p.y }
    const c = (v1.x * v2.x + v1.y * v2.y) / (Math.hypot(v1.x, v1.y) * Math.hypot(v2.x, v2.y))
    return (Math.acos(Math.max(-1, Math.min(1, c))) * 180) / Math.PI
  })
}

/** Clockwise on screen, starting with the corner nearest the picture's top left. */
function orderCorners(q: Pt[]): Quad {
  const c = { x: q.reduce((s, p) => s + p.x, 0) / 4, y: q.reduce((s, p) => s + p.y, 0) / 4 }
  const sorted = [...q].sort((a, b) => Math.atan2(a.y - c.y, a.x - c.x) - Math.atan2(b.y - c.y, b.x - c.x))
  let first = 0
  for (let i = 1; i < 4; i++) if (sorted[i]!.x + sorted[i]!.y < sorted[first]!.x + sorted[first]!.y) first = i
  return [0, 1, 2, 3].map((k) => sorted[(first + k) % 4]!) as Quad
}

export interface SheetFound {
  /** Top left, top right, bottom right, bottom left, in the image's pixels (continuous). */
  corners: Quad
  /** Share of the picture the sheet covers. */
  coverage: number
}

/**
 * The sheet's corners in a luma image, or null when no sheet with four visible corners is
 * seen. The sheet's piece and hull are found on a half-size copy (fast, and its averaging
 * calms noise); the sides are placed on the image itself.
 */
export function findSheet(luma: Uint8Array, fullW: number, fullH: number): SheetFound | null {
  if (fullW < 64 || fullH < 64) return null
  const { img: smooth, width: w, height: h } = halveGrey(luma, fullW, fullH)
  const t = otsuThreshold(histogram(smooth))
  const light = new Uint8Array(w * h)
  for (let i = 0; i < light.length; i++) light[i] = smooth[i]! > t ? 1 : 0
  const { pieces, labels } = findPieces(light, w, h)
  let id = -1
  for (let i = 0; i < pieces.length; i++) if (id < 0 || pieces[i]!.area > pieces[id]!.area) id = i
  if (id < 0) return null
  // Never below half-way from Otsu's level down to the background's mean.
  let darkSum = 0, darkN = 0
  for (let i = 0; i < smooth.length; i++) if (smooth[i]! <= t) { darkSum += smooth[i]!; darkN++ }
  growSoftly(smooth, w, h, labels, id + 1, darkN ? (t + darkSum / darkN) / 2 : t)
  let area = 0
  for (let i = 0; i < labels.length; i++) if (labels[i] === id + 1) area++
  if (area < w * h / 6) return null
  // Touching the picture's edge over more than a sliver: the sheet runs off the picture.
  let touching = 0
  for (let x = 0; x < w; x++) { if (labels[x] === id + 1) touching++; if (labels[(h - 1) * w + x] === id + 1) touching++ }
  for (let y = 0; y < h; y++) { if (labels[y * w] === id + 1) touching++; if (labels[y * w + w - 1] === id + 1) touching++ }
  if (touching > 0.02 * 2 * (w + h)) return null
  // The hull needs only the outermost pixels of each row (their outer corners).
  const pts: Pt[] = []
  for (let y = 0; y < h; y++) {
    let first = -1, last = -1
    for (let x = 0; x < w; x++) if (labels[y * w + x] === id + 1) { if (first < 0) first = x; last = x }
    if (first >= 0) pts.push({ x: first, y }, { x: first, y: y + 1 }, { x: last + 1, y }, { x: last + 1, y: y + 1 })
  }
  const hull = convexHull(pts).map((p) => ({ x: 2 * p.x, y: 2 * p.y }))
  if (hull.length < 4) return null
  const hullArea = polygonArea(hull)
  const quadIx = largestQuad(hull)
  const coarse = quadIx.map((i) => hull[i]!)
  if (polygonArea(coarse) < 0.9 * hullArea) return null
  const centre = { x: coarse.reduce((s, p) => s + p.x, 0) / 4, y: coarse.reduce((s, p) => s + p.y, 0) / 4 }
  const lines = coarse.map((p, i) => fitLine(edgePoints(luma, fullW, fullH, p, coarse[(i + 1) % 4]!, centre)))
  const refined: Pt[] = []
  for (let i = 0; i < 4; i++) {
    const a = lines[(i + 3) % 4], b = lines[i]
    const p = a && b ? intersect(a, b) : null
    refined.push(p && Math.hypot(p.x - coarse[i]!.x, p.y - coarse[i]!.y) < 0.05 * Math.max(fullW, fullH) ? p : coarse[i]!)
  }
  const angles = interiorAngles(refined)
  if (angles.some((a) => a < 35 || a > 145)) return null
  if (refined.some((p) => p.x < -1 || p.y < -1 || p.x > fullW + 1 || p.y > fullH + 1)) return null
  if (looksLikeDrawnFrame(smooth, w, h, refined.map((p) => ({ x: p.x / 2, y: p.y / 2 })), labels, id + 1)) return null
  return { corners: orderCorners(refined), coverage: polygonArea(refined) / (fullW * fullH) }
}

function insideConvex(q: readonly Pt[], x: number, y: number): boolean {
  let sign = 0
  for (let i = 0; i < q.length; i++) {
    const c = cross(q[i]!, q[(i + 1) % q.length]!, { x, y })
    if (c === 0) continue
    if (sign === 0) sign = Math.sign(c)
    else if (Math.sign(c) !== sign) return false
  }
  return true
}

/**
 * A light rectangle square to the picture inside a uniform, ink-dark surround is a drawing's
 * own frame running off the edges of a tight scan, not a sheet on a table: a table is seldom
 * as dark and even as ink, and a photo of a sheet is seldom square to the picture.
 */
function looksLikeDrawnFrame(img: Uint8Array, w: number, h: number, q: readonly Pt[], labels: Int32Array, id: number): boolean {
  const square = q.every((p, i) => {
    const r = q[(i + 1) % 4]!
    const deg = (Math.atan2(Math.abs(r.y - p.y), Math.abs(r.x - p.x)) * 180) / Math.PI
    return Math.min(deg, 90 - deg) < 2.5
  })
  if (!square) return false
  const inside: number[] = []
  let n = 0, sum = 0, sq = 0
  for (let y = 0; y < h; y += 2) {
    for (let x = 0; x < w; x += 2) {
      const v = img[y * w + x]!
      if (insideConvex(q, x + 0.5, y + 0.5)) { if (labels[y * w + x] === id) inside.push(v); continue }
      n++; sum += v; sq += v * v
    }
  }
  if (!n || !inside.length) return false
  inside.sort((a, b) => a - b)
  const paper = inside[inside.length >> 1]!
  const mean = sum / n, sd = Math.sqrt(Math.max(0, sq / n - mean * mean))
  return mean < 0.35 * paper && sd < 15
}

/** A typical phone camera's focal length, in pixels of the long side (from memory: about 26 mm equivalent). */
const DEFAULT_FOCAL_PER_LONG_SIDE = 0.8

/**
 * Width ÷ height of the rectangle photographed as `q` (corners in source pixels), for a camera
 * whose principal point is (cx, cy) (the picture's centre); also the focal length used.
 */
export function sheetAspect(q: Quad, cx: number, cy: number, longSide: number): { aspect: number, focal: number, solved: boolean } {
  const unit: Quad = [{ x: 0, y: 0 }, { x: 1, y: 0 }, { x: 1, y: 1 }, { x: 0, y: 1 }]
  const H = homographyFromPoints(unit, q.map((p) => ({ x: p.x - cx, y: p.y - cy })))
  const h1 = [H[0], H[3], H[6]], h2 = [H[1], H[4], H[7]]
  const f2 = -(h1[0]! * h2[0]! + h1[1]! * h2[1]!) / (h1[2]! * h2[2]!)
  const solved = Number.isFinite(f2) && f2 > (0.2 * longSide) ** 2 && f2 < (5 * longSide) ** 2
  const f = solved ? Math.sqrt(f2) : DEFAULT_FOCAL_PER_LONG_SIDE * longSide
  const n1 = Math.hypot(h1[0]! / f, h1[1]! / f, h1[2]!)
  const n2 = Math.hypot(h2[0]! / f, h2[1]! / f, h2[2]!)
  return { aspect: n1 / n2, focal: f, solved }
}

export interface SheetFrame {
  /** Size of the straightened sheet, px (at the resolution of its nearest side). */
  width: number
  height: number
  /** Straightened sheet pixel → source pixel (continuous coordinates). */
  toSource: Mat3
  aspect: number
}

/**
 * The straightened rectangle for corners `q` (source pixels), the camera's principal point at
 * (cx, cy) (the centre of the whole photo), with `insetShare` of each side left out at the
 * sheet's edge (where the background's shadow and the paper's own edge are).
 */
export function sheetFrame(q: Quad, cx: number, cy: number, longSide: number, insetShare = 0): SheetFrame {
  const { aspect } = sheetAspect(q, cx, cy, longSide)
  const side = (a: Pt, b: Pt) => Math.hypot(b.x - a.x, b.y - a.y)
  // Resolution of the nearest (longest-looking) side, so nothing is lost there.
  const along = Math.max(side(q[0], q[1]), side(q[3], q[2]))
  const down = Math.max(side(q[0], q[3]), side(q[1], q[2]))
  let W = along, Hh = along / aspect
  if (Hh < down) { Hh = down; W = down * aspect }
  const rect: Quad = [{ x: 0, y: 0 }, { x: W, y: 0 }, { x: W, y: Hh }, { x: 0, y: Hh }]
  const H = homographyFromPoints(rect, q)
  const mx = insetShare * W, my = insetShare * Hh
  const width = Math.max(1, Math.round(W - 2 * mx)), height = Math.max(1, Math.round(Hh - 2 * my))
  return { width, height, toSource: multiply(H, translation(mx, my)), aspect }
}
