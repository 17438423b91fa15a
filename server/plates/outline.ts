// Exact outlines for plates: glyph contours from the font, rectangles, and which closed curve
// is ink and which a hole.
import type opentype from 'opentype.js'
import type { ClosedCurve, Point, Segment } from '../pipeline/trace'
import { flattenCurve } from '../cutsheet/path'

/** A closed curve before we know whether it bounds ink or a hole. */
export interface Contour { segments: Segment[] }

/**
 * The contours of a glyph's outline, placed with its origin at (originX, baselineY) in mm,
 * y down, at `mmPerUnit` millimetres per font unit. Quadratic segments (TrueType outlines) are
 * raised to cubics exactly: C1 = P0 + ⅔(Q − P0), C2 = P2 + ⅔(Q − P2).
 */
export function glyphContours(glyph: opentype.Glyph, originX: number, baselineY: number, mmPerUnit: number): Contour[] {
  const at = (x: number, y: number): Point => ({ x: originX + x * mmPerUnit, y: baselineY - y * mmPerUnit })
  const contours: Contour[] = []
  let segments: Segment[] = []
  let start: Point | null = null
  let pos: Point | null = null
  const close = () => {
    if (start && pos && (pos.x !== start.x || pos.y !== start.y)) segments.push({ kind: 'line', from: pos, to: start })
    if (segments.length > 0) contours.push({ segments })
    segments = []
    start = pos = null
  }
  for (const c of glyph.path.commands) {
    if (c.type === 'M') { close(); start = pos = at(c.x, c.y); continue }
    if (c.type === 'Z') { close(); continue }
    if (!pos) throw new SyntaxError(`Glyph ${glyph.name ?? glyph.index}: a segment before any move.`)
    const to = at(c.x, c.y)
    if (c.type === 'L') {
      if (to.x !== pos.x || to.y !== pos.y) segments.push({ kind: 'line', from: pos, to })
    } else if (c.type === 'Q') {
      const q = at(c.x1, c.y1)
      const c1 = { x: pos.x + (2 / 3) * (q.x - pos.x), y: pos.y + (2 / 3) * (q.y - pos.y) }
      const c2 = { x: to.x + (2 / 3) * (q.x - to.x), y: to.y + (2 / 3) * (q.y - to.y) }
      segments.push({ kind: 'cubic', from: pos, c1, c2, to })
    } else {
      segments.push({ kind: 'cubic', from: pos, c1: at(c.x1, c.y1), c2: at(c.x2, c.y2), to })
    }
    pos = to
  }
  close()
  return contours
}

/** Kappa for a quarter circle as one cubic: 4(√2 − 1)/3 (radial error about 0.027 % of r). */
const KAPPA = (4 * (Math.SQRT2 - 1)) / 3

/** A rectangle at (x, y) of w × h mm, corners rounded by radius r (0 for square corners), clockwise on screen. */
export function rectangleContour(x: number, y: number, w: number, h: number, r: number): Contour {
  if (!(w > 0 && h > 0)) throw new RangeError('A rectangle needs a positive width and height.')
  if (!(r >= 0) || r > Math.min(w, h) / 2) throw new RangeError(`A corner radius must be between 0 and half the shorter side (${Math.min(w, h) / 2} mm).`)
  const x2 = x + w, y2 = y + h
  const line = (from: Point, to: Point): Segment => ({ kind: 'line', from, to })
  if (r === 0) {
    const a = { x, y }, b = { x: x2, y }, c = { x: x2, y: y2 }, d = { x, y: y2 }
    return { segments: [line(a, b), line(b, c), line(c, d), line(d, a)] }
  }
  const k = r * KAPPA
  const corner = (from: Point, c1: Point, c2: Point, to: Point): Segment => ({ kind: 'cubic', from, c1, c2, to })
  const p = {
    topL: { x: x + r, y }, topR: { x: x2 - r, y },
    rightT: { x: x2, y: y + r }, rightB: { x: x2, y: y2 - r },
    botR: { x: x2 - r, y: y2 }, botL: { x: x + r, y: y2 },
    leftB: { x, y: y2 - r }, leftT: { x, y: y + r },
  }
  const segments: Segment[] = []
  const straight = (from: Point, to: Point) => { if (from.x !== to.x || from.y !== to.y) segments.push(line(from, to)) }
  straight(p.topL, p.topR)
  segments.push(corner(p.topR, { x: x2 - r + k, y }, { x: x2, y: y + r - k }, p.rightT))
  straight(p.rightT, p.rightB)
  segments.push(corner(p.rightB, { x: x2, y: y2 - r + k }, { x: x2 - r + k, y: y2 }, p.botR))
  straight(p.botR, p.botL)
  segments.push(corner(p.botL, { x: x + r - k, y: y2 }, { x, y: y2 - r + k }, p.leftB))
  straight(p.leftB, p.leftT)
  segments.push(corner(p.leftT, { x, y: y + r - k }, { x: x + r - k, y }, p.topL))
  return { segments }
}

/** Even-odd point-in-polygon test (ray casting to +x). */
function inside(p: Point, polygon: Point[]): boolean {
  let odd = false
  for (let i = 0, j = polygon.length - 1; i < polygon.length; j = i++) {
    const a = polygon[i]!, b = polygon[j]!
    if ((a.y > p.y) !== (b.y > p.y) && p.x < ((b.x - a.x) * (p.y - a.y)) / (b.y - a.y) + a.x) odd = !odd
  }
  return odd
}

/**
 * Ink or hole for each contour, as the even-odd fill rule paints them: a contour inside an even
 * number of others bounds ink (+1), inside an odd number a hole (−1). Contours must not cross
 * (true of the fonts we ship, checked in the tests, and of rectangles around them).
 */
export function signByNesting(contours: Contour[], toleranceMm = 0.01): ClosedCurve[] {
  const polygons = contours.map((c) => flattenCurve(c, toleranceMm))
  return contours.map((c, i) => {
    const probe = c.segments[0]!.from
    let depth = 0
    polygons.forEach((poly, j) => { if (j !== i && poly.length >= 3 && inside(probe, poly)) depth++ })
    return { sign: depth % 2 === 0 ? 1 : -1, segments: c.segments }
  })
}
