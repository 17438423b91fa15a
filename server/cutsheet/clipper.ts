// Polygon offsetting and clipping for cut sheets, through clipper-lib (a JavaScript port of
// Angus Johnson's Clipper 6). Everything that needs an offset or a clip goes through here, so
// one library and one integer grid decide every distance on the sheet.
//
// Clipper works on integers: millimetres are scaled by CLIPPER_SCALE (0.1 µm units). Sheets up
// to about 100 m stay inside Clipper's fast 30-bit range, far beyond any film.
import * as ClipperNs from 'clipper-lib'
import type { Point } from './path'

// The package is CommonJS: under Node's ESM loader the namespace holds only `default`,
// under a bundler it may hold the names themselves.
const ClipperLib: typeof ClipperNs = (ClipperNs as unknown as { default?: typeof ClipperNs }).default ?? ClipperNs

/** Clipper units per millimetre. */
export const CLIPPER_SCALE = 10_000

/**
 * How far a round join's chords may stray inside the true arc, as a multiple of the arc
 * tolerance given to Clipper. Clipper spaces the arc's vertices by the angle whose chord has
 * that tolerance as its sagitta, but rounds the number of steps to the nearest whole number
 * and ends on the arc's true end, so the last chord may span up to 1.5 steps: its sagitta is
 * then at most 1.5² = 2.25 times the tolerance (read in clipper-lib's ClipperOffset.DoRound;
 * measured in the tests).
 */
export const ARC_CHORD_FACTOR = 2.25

type IntPath = ClipperNs.Path

function toInt(poly: Point[]): IntPath {
  return poly.map((p) => ({ X: Math.round(p.x * CLIPPER_SCALE), Y: Math.round(p.y * CLIPPER_SCALE) }))
}

function toMm(path: IntPath): Point[] {
  return path.map((p) => ({ x: p.X / CLIPPER_SCALE, y: p.Y / CLIPPER_SCALE }))
}

/** Signed area in mm² (shoelace formula); its sign tells the direction of travel. */
export function signedArea(poly: Point[]): number {
  let a = 0
  for (let i = 0, j = poly.length - 1; i < poly.length; j = i++) a += (poly[j]!.x - poly[i]!.x) * (poly[j]!.y + poly[i]!.y)
  return a / 2
}

/** The region inside an odd number of the closed polygons (SVG's even-odd fill), as outer boundaries and holes. */
function evenOddRegion(polygons: Point[][]): IntPath[] {
  const c = new ClipperLib.Clipper()
  c.AddPaths(polygons.map(toInt), ClipperLib.PolyType.ptSubject, true)
  const out: IntPath[] = []
  c.Execute(ClipperLib.ClipType.ctUnion, out, ClipperLib.PolyFillType.pftEvenOdd, ClipperLib.PolyFillType.pftEvenOdd)
  return out
}

function offsetPaths(paths: IntPath[], deltaMm: number, arcToleranceMm: number): Point[][] {
  const o = new ClipperLib.ClipperOffset(2, arcToleranceMm * CLIPPER_SCALE)
  o.AddPaths(paths, ClipperLib.JoinType.jtRound, ClipperLib.EndType.etClosedPolygon)
  const out: IntPath[] = []
  o.Execute(out, deltaMm * CLIPPER_SCALE)
  return out.map(toMm)
}

/**
 * Every boundary of the even-odd region of `polygons`, moved outwards by `deltaMm` (into the
 * film around a piece, and into each hole), with round joins: the set of points within
 * `deltaMm` of the region, which is the path a beam's centre must follow for its edge to
 * trace the region. Round corners are chords whose vertices lie on the true arc, at most
 * ARC_CHORD_FACTOR × `arcToleranceMm` inside it. Outer boundaries and holes come back with opposite orientation.
 */
export function offsetRegion(polygons: Point[][], deltaMm: number, arcToleranceMm: number): Point[][] {
  return offsetPaths(evenOddRegion(polygons), deltaMm, arcToleranceMm)
}

/**
 * The region's outer boundaries with their holes filled in (what a piece covers on the film),
 * grown by `deltaMm` with round joins: a keep-out zone around the piece.
 */
export function grownOutline(polygons: Point[][], deltaMm: number, arcToleranceMm: number): Point[][] {
  const outers = evenOddRegion(polygons).filter((p) => ClipperLib.Clipper.Orientation(p))
  const c = new ClipperLib.Clipper()
  c.AddPaths(outers, ClipperLib.PolyType.ptSubject, true)
  const filled: IntPath[] = []
  c.Execute(ClipperLib.ClipType.ctUnion, filled, ClipperLib.PolyFillType.pftNonZero, ClipperLib.PolyFillType.pftNonZero)
  return offsetPaths(filled, deltaMm, arcToleranceMm)
}

export type RegionOperation = 'union' | 'intersection' | 'difference'

/**
 * A boolean operation between two regions, each the set of closed polygons filled by the given
 * rule ('even-odd' for curves read from an SVG, 'non-zero' for Clipper's own results, whose
 * outer boundaries and holes run opposite ways). The result comes back as non-overlapping outer
 * boundaries and holes, which either rule fills alike.
 */
export function clipRegions(subject: Point[][], clip: Point[][], op: RegionOperation, fill: 'even-odd' | 'non-zero' = 'non-zero'): Point[][] {
  const c = new ClipperLib.Clipper()
  c.AddPaths(subject.map(toInt), ClipperLib.PolyType.ptSubject, true)
  c.AddPaths(clip.map(toInt), ClipperLib.PolyType.ptClip, true)
  const type = op === 'union' ? ClipperLib.ClipType.ctUnion : op === 'intersection' ? ClipperLib.ClipType.ctIntersection : ClipperLib.ClipType.ctDifference
  const rule = fill === 'even-odd' ? ClipperLib.PolyFillType.pftEvenOdd : ClipperLib.PolyFillType.pftNonZero
  const out: IntPath[] = []
  c.Execute(type, out, rule, rule)
  return out.map(toMm)
}

/** Whether a polygon from clipRegions or offsetRegion is an outer boundary (else a hole). */
export function isOuterBoundary(poly: Point[]): boolean {
  return ClipperLib.Clipper.Orientation(toInt(poly))
}
