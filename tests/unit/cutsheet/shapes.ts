// Test shapes made in code (rectangles, discs, rings, an L), and small independent readers
// for what the cut sheet files say. Nothing here imports the code under test except types.
import type { ClosedCurve, Point, Segment } from '../../../server/pipeline/trace'

const r2 = (v: number) => Math.round(v * 100) / 100
const n = (v: number) => String(r2(v))

/**
 * Control-point distance for a quarter circle as one cubic: k = 4/3 · tan(θ/4) with θ = π/2
 * (the choice that puts the cubic's midpoint on the circle; handbook Bézier geometry).
 */
export const QUARTER_K = (4 / 3) * Math.tan(Math.PI / 8)

/** A disc of radius r as four cubics, clockwise on screen (y down), coordinates on the 0.01 grid. */
export function discPathData(cx: number, cy: number, r: number, reverse = false): string {
  const k = QUARTER_K * r
  if (!reverse) {
    return `M${n(cx + r)} ${n(cy)}`
      + `C${n(cx + r)} ${n(cy + k)} ${n(cx + k)} ${n(cy + r)} ${n(cx)} ${n(cy + r)}`
      + `C${n(cx - k)} ${n(cy + r)} ${n(cx - r)} ${n(cy + k)} ${n(cx - r)} ${n(cy)}`
      + `C${n(cx - r)} ${n(cy - k)} ${n(cx - k)} ${n(cy - r)} ${n(cx)} ${n(cy - r)}`
      + `C${n(cx + k)} ${n(cy - r)} ${n(cx + r)} ${n(cy - k)} ${n(cx + r)} ${n(cy)}Z`
  }
  return `M${n(cx + r)} ${n(cy)}`
    + `C${n(cx + r)} ${n(cy - k)} ${n(cx + k)} ${n(cy - r)} ${n(cx)} ${n(cy - r)}`
    + `C${n(cx - k)} ${n(cy - r)} ${n(cx - r)} ${n(cy - k)} ${n(cx - r)} ${n(cy)}`
    + `C${n(cx - r)} ${n(cy + k)} ${n(cx - k)} ${n(cy + r)} ${n(cx)} ${n(cy + r)}`
    + `C${n(cx + k)} ${n(cy + r)} ${n(cx + r)} ${n(cy + k)} ${n(cx + r)} ${n(cy)}Z`
}

export function rectPathData(x: number, y: number, w: number, h: number): string {
  return `M${n(x)} ${n(y)}H${n(x + w)}V${n(y + h)}H${n(x)}Z`
}

/** An L: a bar x 5–15, y 5–45 and a foot x 5–35, y 35–45, in a 40 × 50 box. */
export const L_BOX = { width: 40, height: 50 }
export const L_PATH = 'M5 5H15V35H35V45H5Z'

/** A clean-vector-like document in mm. */
export function svgMm(widthMm: number, heightMm: number, paths: string[]): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${widthMm}mm" height="${heightMm}mm" viewBox="0 0 ${widthMm} ${heightMm}">`
    + paths.map((d) => `<path d="${d}" fill="#000" fill-rule="evenodd"/>`).join('') + '</svg>'
}

// ---------------------------------------------------------------------------------------
// The same shapes as curves in prepared-bitmap pixels, for the pipeline's clean vector.
// ---------------------------------------------------------------------------------------

const P = (x: number, y: number): Point => ({ x, y })

export function discCurve(cx: number, cy: number, r: number, sign: 1 | -1): ClosedCurve {
  const k = QUARTER_K * r
  const pts = [P(cx + r, cy), P(cx, cy + r), P(cx - r, cy), P(cx, cy - r)]
  const ctrl = [
    [P(cx + r, cy + k), P(cx + k, cy + r)], [P(cx - k, cy + r), P(cx - r, cy + k)],
    [P(cx - r, cy - k), P(cx - k, cy - r)], [P(cx + k, cy - r), P(cx + r, cy - k)],
  ]
  let segments: Segment[] = pts.map((from, i) => ({ kind: 'cubic', from, c1: ctrl[i]![0]!, c2: ctrl[i]![1]!, to: pts[(i + 1) % 4]! }))
  if (sign === -1) {
    segments = segments.reverse().map((s) => s.kind === 'cubic' ? { kind: 'cubic', from: s.to, c1: s.c2, c2: s.c1, to: s.from } : s)
  }
  return { sign, segments }
}

export function rectCurve(x: number, y: number, w: number, h: number): ClosedCurve {
  const c = [P(x, y), P(x + w, y), P(x + w, y + h), P(x, y + h)]
  return { sign: 1, segments: c.map((from, i) => ({ kind: 'line', from, to: c[(i + 1) % 4]! })) }
}

// ---------------------------------------------------------------------------------------
// Independent readers for the files
// ---------------------------------------------------------------------------------------

export interface Matrix { a: number, b: number, c: number, d: number, e: number, f: number }

/** translate(x y) or matrix(a b c d e f), as SVG 1.1 §7.6 defines them. */
export function parseTransform(t: string): Matrix {
  const nums = (s: string) => s.trim().split(/[\s,]+/).map(Number)
  let m = /^translate\(([^)]*)\)$/.exec(t.trim())
  if (m) { const [e = 0, f = 0] = nums(m[1]!); return { a: 1, b: 0, c: 0, d: 1, e, f } }
  m = /^matrix\(([^)]*)\)$/.exec(t.trim())
  if (m) { const [a, b, c, d, e, f] = nums(m[1]!) as [number, number, number, number, number, number]; return { a, b, c, d, e, f } }
  throw new Error(`unexpected transform ${t}`)
}

export const applyMatrix = (m: Matrix, p: Point): Point => ({ x: m.a * p.x + m.c * p.y + m.e, y: m.b * p.x + m.d * p.y + m.f })

export interface SvgGroup { id: string, transform: string | null, paths: string[] }

/**
 * The cut elements of a sheet, in document order, each with its transform and path data:
 * every <use id="…"> resolved to the <path id="…"> in <defs> it references (SVG 1.1 §5.6: a
 * 'use' draws the referenced element with its own transform applied), and every other
 * <path id="…"> outside <defs> (weeding frames) as it stands.
 */
export function groupsOf(svg: string): SvgGroup[] {
  const defs = new Map<string, string>()
  for (const block of svg.matchAll(/<defs>([\s\S]*?)<\/defs>/g)) {
    for (const m of block[1]!.matchAll(/<path id="([^"]+)" d="([^"]*)"\/>/g)) defs.set(m[1]!, m[2]!)
  }
  const body = svg.replace(/<defs>[\s\S]*?<\/defs>/g, '')
  const out: SvgGroup[] = []
  for (const m of body.matchAll(/<use id="([^"]+)" xlink:href="#([^"]+)"(?: transform="([^"]+)")?\/>|<path id="([^"]+)" d="([^"]*)"\/>/g)) {
    if (m[1]) {
      const d = defs.get(m[2]!)
      if (d === undefined) throw new Error(`<use> ${m[1]} references #${m[2]}, which <defs> does not define`)
      out.push({ id: m[1], transform: m[3] ?? null, paths: [d] })
    } else out.push({ id: m[4]!, transform: null, paths: [m[5]!] })
  }
  return out
}

/** Distance from p to segment ab. */
export function distToSegment(p: Point, a: Point, b: Point): number {
  const dx = b.x - a.x, dy = b.y - a.y
  const l2 = dx * dx + dy * dy
  const t = l2 === 0 ? 0 : Math.max(0, Math.min(1, ((p.x - a.x) * dx + (p.y - a.y) * dy) / l2))
  return Math.hypot(p.x - a.x - t * dx, p.y - a.y - t * dy)
}

/** Perimeter of a closed polygon. */
export function closedLength(pts: Point[]): number {
  let l = 0
  for (let i = 0; i < pts.length; i++) {
    const a = pts[i]!, b = pts[(i + 1) % pts.length]!
    l += Math.hypot(b.x - a.x, b.y - a.y)
  }
  return l
}

/** Points of a cubic by direct evaluation of the Bernstein form. */
export function sampleCubic(s: Extract<Segment, { kind: 'cubic' }>, count: number): Point[] {
  const out: Point[] = []
  for (let i = 0; i <= count; i++) {
    const t = i / count, u = 1 - t
    out.push({
      x: u * u * u * s.from.x + 3 * u * u * t * s.c1.x + 3 * u * t * t * s.c2.x + t * t * t * s.to.x,
      y: u * u * u * s.from.y + 3 * u * u * t * s.c1.y + 3 * u * t * t * s.c2.y + t * t * t * s.to.y,
    })
  }
  return out
}
