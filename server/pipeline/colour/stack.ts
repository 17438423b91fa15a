// Stack order and overlap of colour layers, on their outlines in millimetres.
//
// Layers are stacked bottom first. Film laid by hand never lands exactly where it should, so a
// lower layer that meets an upper one either
//  - 'under': runs on under the upper layer by the overlap, so a slip of up to that much shows
//    no paper-coloured gap:   L′ = L ∪ (grow(L, d) ∩ U)
//  - 'knock-out': is cut away where an upper layer sits, except a strip of the overlap's width
//    inside the upper layer's edge:   L′ = (L ∪ (grow(L, d) ∩ U)) − shrink(U, d)
// where U is the union of every layer above, grow and shrink are polygon offsets with round
// joins (the points within d of the region, and those further than d from its outside), and
// d = 0 gives the plain layer under, or the plain knock-out L − U. The grown part lies wholly
// under U, so at perfect register nothing of a lower layer shows beyond its drawn outline.
//
// Seams: two inks that touch on paper are outlined one mask at a time, and each outline
// smooths its own corners, so between them runs a seam belonging to neither, up to a pixel or
// two of the prepared bitmap wide. Given a seam width s, the growth reaches into U grown by s,
// L ∪ (grow(L, d) ∩ grow(U, s)), so the lower layer fills the seam; it may then show by up to
// s beyond U where the two meet the paper. s = 0 (the default) is the plain rule above.
//
// Geometry goes through the project's Clipper helpers (server/cutsheet/clipper.ts) on curves
// flattened within STACK_FLATTEN_TOLERANCE_MM; a reshaped layer comes out as straight
// segments on the clean vector's 0.01 mm grid. A layer nothing changes keeps its curves.
// Worst distance from the exact answer: flattening 0.005 mm + round joins 2.25 × 0.002 mm
// (ARC_CHORD_FACTOR, clipper.ts) + the grid's half diagonal 0.0071 mm, under 0.02 mm.
import { clipRegions, isOuterBoundary, offsetRegion } from '../../cutsheet/clipper'
import { flattenCurve, type CutCurve } from '../../cutsheet/path'
import { signByNesting } from '../../plates/outline'
import { cleanVector } from '../clean'
import type { ClosedCurve, Point, Segment } from '../trace'
import { DEFAULT_STACK, MAX_OVERLAP_MM, type StackSettings } from './defaults'

export const STACK_FLATTEN_TOLERANCE_MM = 0.005
export const STACK_ARC_TOLERANCE_MM = 0.002
export { DEFAULT_STACK, MAX_OVERLAP_MM, type StackMode, type StackSettings } from './defaults'

export interface Canvas { widthMm: number, heightMm: number }

export interface StackedLayer {
  /** Closed curves in mm on the 0.01 mm grid, outer boundaries sign 1, holes −1. */
  curves: ClosedCurve[]
  /** The layer as a clean vector (same form as server/pipeline/clean.ts gives). */
  svg: string
  widthMm: number
  heightMm: number
  nodeCount: number
  /** False when the stack left this layer as drawn. */
  reshaped: boolean
}

function checkSettings(s: StackSettings): StackSettings {
  if (s.mode !== 'under' && s.mode !== 'knock-out') throw new RangeError(`A layer is stacked 'under' or 'knock-out' (got ${String(s.mode)}).`)
  if (typeof s.overlapMm !== 'number' || !(s.overlapMm >= 0 && s.overlapMm <= MAX_OVERLAP_MM)) {
    throw new RangeError(`The overlap must be between 0 and ${MAX_OVERLAP_MM} mm (got ${String(s.overlapMm)}).`)
  }
  return s
}

/** A layer's even-odd region as outer boundaries and holes. */
export function layerRegion(curves: CutCurve[], toleranceMm = STACK_FLATTEN_TOLERANCE_MM): Point[][] {
  const flat = curves.map((c) => flattenCurve(c, toleranceMm)).filter((p) => p.length >= 3)
  return clipRegions(flat, [], 'union', 'even-odd')
}

/** Curves with their signs: kept where they have one (a traced outline), else read from their nesting. */
export function signedCurves(curves: Array<CutCurve | ClosedCurve>): ClosedCurve[] {
  if (curves.every((c): c is ClosedCurve => 'sign' in c)) return curves
  return signByNesting(curves)
}

export interface StackOptions {
  /** Width of the seam between touching layers that the growth fills, mm (see above). */
  seamMm?: number
}

/** Closed polygons as closed curves of straight segments, signed by their direction. */
export function polygonsToCurves(polygons: Point[][]): ClosedCurve[] {
  return polygons.filter((p) => p.length >= 3).map((p) => {
    const segments: Segment[] = p.map((from, i) => ({ kind: 'line', from, to: p[(i + 1) % p.length]! }))
    return { sign: isOuterBoundary(p) ? 1 : -1, segments }
  })
}

/** The clean vector of curves in mm on a canvas (one user unit = 1 mm). */
export function layerVector(curves: ClosedCurve[], canvas: Canvas): { svg: string, curves: ClosedCurve[], widthMm: number, heightMm: number, nodeCount: number } {
  const clean = cleanVector({ curves, width: canvas.widthMm, height: canvas.heightMm, pxPerMm: 1 })
  return { svg: clean.svg, curves: clean.curvesMm, widthMm: clean.widthMm, heightMm: clean.heightMm, nodeCount: clean.nodeCount }
}

/**
 * The layers reshaped for stacking, bottom first. `settings` holds for every layer, or is given
 * per layer (bottom first; the top layer's is not used). Curves are in mm on one canvas.
 */
export function stackLayers(layers: Array<{ curves: Array<CutCurve | ClosedCurve> }>, canvas: Canvas, settings: StackSettings | StackSettings[] = DEFAULT_STACK, options: StackOptions = {}): StackedLayer[] {
  const seam = options.seamMm ?? 0
  if (!(seam >= 0 && seam <= MAX_OVERLAP_MM)) throw new RangeError(`The seam must be between 0 and ${MAX_OVERLAP_MM} mm.`)
  const per = Array.isArray(settings) ? settings : layers.map(() => settings)
  if (per.length !== layers.length) throw new RangeError(`Stack settings are given for ${per.length} layers, not ${layers.length}.`)
  per.forEach(checkSettings)
  const regions = layers.map((l) => layerRegion(l.curves))
  // above[i]: union of every layer above layer i.
  const above: Point[][][] = new Array(layers.length)
  let acc: Point[][] = []
  for (let i = layers.length - 1; i >= 0; i--) {
    above[i] = acc
    acc = clipRegions(acc, regions[i]!, 'union')
  }
  return layers.map((layer, i) => {
    const { mode, overlapMm: d } = per[i]!
    const upper = above[i]!
    if (upper.length === 0 || (mode === 'under' && d === 0)) {
      return { ...layerVector(signedCurves(layer.curves), canvas), reshaped: false }
    }
    let region = regions[i]!
    if (d > 0) {
      const reach = seam > 0 ? offsetRegion(upper, seam, STACK_ARC_TOLERANCE_MM) : upper
      const grown = clipRegions(offsetRegion(region, d, STACK_ARC_TOLERANCE_MM), reach, 'intersection')
      region = clipRegions(region, grown, 'union')
    }
    if (mode === 'knock-out') {
      const cutAway = d > 0 ? offsetRegion(upper, -d, STACK_ARC_TOLERANCE_MM) : upper
      region = clipRegions(region, cutAway, 'difference')
    }
    return { ...layerVector(polygonsToCurves(region), canvas), reshaped: true }
  })
}
