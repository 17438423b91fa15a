// Outline: the prepared bitmap traced into closed curves with the npm port of potrace.
//
// The port normally decodes an image with Jimp and thresholds its own luminance copy. We skip
// that: its luminance bitmap (lib/types/Bitmap.js) is filled from our 1-bit bitmap (ink = 0,
// paper = 255) and thresholded at 128 with blackOnWhite, so that exactly our ink is what the
// tracer treats as black (the port counts a pixel as black when lum <= threshold). Then its
// two stages are run directly: _bmToPathlist (decomposition into boundary paths, speck filter)
// and _processPath (polygon, vertex adjustment, corner/curve smoothing, curve joining).
// These are private methods of potrace 2.1.8 (pinned in package.json); trace.test.ts fails
// loudly if they change.
//
// One correction: the port decides a path's sign (outer boundary of ink, or boundary of a
// hole) from its working copy, which it XOR-fills as it goes, so every path comes out as "+".
// Potrace's algorithm reads the sign from the original bitmap at the path's first pixel; we do
// that ourselves between the two stages, so holes are marked and, as in potrace, reversed.
//
// Synchronous and pure: safe to call from a worker thread.
import { createRequire } from 'node:module'
import { DEFAULT_NODE_CAP, TooComplexError } from './errors'
import type { PipelineSettings } from '../../shared/utils/settings'

const require = createRequire(import.meta.url)

interface PtPoint { x: number, y: number }
interface PtCurve { n: number, tag: Array<'CURVE' | 'CORNER'>, c: PtPoint[] }
interface PtPath { pt: PtPoint[], sign: '+' | '-', area: number, len: number, curve: PtCurve }
interface PtBitmap { width: number, height: number, size: number, data: Uint8Array }
interface PtInstance {
  _luminanceData: PtBitmap | null
  _imageLoaded: boolean
  _processed: boolean
  _pathlist: PtPath[]
  _bmToPathlist(): void
  _processPath(): void
}
type PtConstructor = new (options: Record<string, unknown>) => PtInstance
type PtBitmapConstructor = new (w: number, h: number) => PtBitmap

const potraceModule = require('potrace') as { Potrace: PtConstructor }
const PotraceBitmap = require('potrace/lib/types/Bitmap.js') as PtBitmapConstructor
const Potrace = potraceModule.Potrace

export interface Point { x: number, y: number }
export type Segment =
  | { kind: 'line', from: Point, to: Point }
  | { kind: 'cubic', from: Point, c1: Point, c2: Point, to: Point }

export interface ClosedCurve {
  /** 1 = outer boundary of a piece of ink, -1 = boundary of a hole in the ink. */
  sign: 1 | -1
  /** Consecutive segments; the last one ends where the first one starts. */
  segments: Segment[]
}

export interface TraceInput {
  bitmap: Uint8Array
  width: number
  height: number
  pxPerMm: number
}

export interface TraceParameters {
  /** potrace turdsize: boundary paths enclosing at most this many px² are dropped. */
  turdSize: number
  /** potrace alphamax (our corner rounding). */
  alphaMax: number
  /** potrace opttolerance (our curve tolerance), px. */
  optTolerance: number
  optCurve: true
  turnPolicy: 'minority'
}

export interface Outline {
  /** Curves in prepared-bitmap pixels, y down, pixel (x, y) spans [x, x+1] × [y, y+1]. */
  curves: ClosedCurve[]
  /** SVG path data of all curves in pixels (3 decimals). */
  pathData: string
  width: number
  height: number
  pxPerMm: number
  nodeCount: number
  parameters: TraceParameters
  timings: { traceMs: number }
}

/**
 * Speck filter in mm² at the target size → potrace turdsize in px² at the prepared resolution:
 * area × pxPerMm², rounded to the nearest whole pixel. Potrace drops a path whose enclosed
 * area is at most turdsize, so a speck of up to the filter's area disappears.
 */
export function speckFilterToTurdSize(speckFilterMm2: number, pxPerMm: number): number {
  return Math.max(0, Math.round(speckFilterMm2 * pxPerMm * pxPerMm))
}

export function traceParameters(
  settings: Pick<PipelineSettings, 'speckFilterMm2' | 'cornerRounding' | 'curveTolerance'>,
  pxPerMm: number,
): TraceParameters {
  return {
    turdSize: speckFilterToTurdSize(settings.speckFilterMm2, pxPerMm),
    alphaMax: settings.cornerRounding,
    optTolerance: settings.curveTolerance,
    optCurve: true,
    turnPolicy: 'minority',
  }
}

function fmt(v: number): string {
  const s = v.toFixed(3)
  return s.includes('.') ? s.replace(/0+$/, '').replace(/\.$/, '') : s
}

export function curvesToPathData(curves: ClosedCurve[], format: (v: number) => string = fmt): string {
  const parts: string[] = []
  for (const curve of curves) {
    if (curve.segments.length === 0) continue
    const s0 = curve.segments[0]!.from
    let d = `M${format(s0.x)} ${format(s0.y)}`
    for (const seg of curve.segments) {
      if (seg.kind === 'line') d += `L${format(seg.to.x)} ${format(seg.to.y)}`
      else d += `C${format(seg.c1.x)} ${format(seg.c1.y)} ${format(seg.c2.x)} ${format(seg.c2.y)} ${format(seg.to.x)} ${format(seg.to.y)}`
    }
    parts.push(d + 'Z')
  }
  return parts.join('')
}

function toCurve(path: PtPath, sign: 1 | -1): ClosedCurve {
  const { n, tag, c } = path.curve
  const segments: Segment[] = []
  let prev: Point = { x: c[(n - 1) * 3 + 2]!.x, y: c[(n - 1) * 3 + 2]!.y }
  for (let i = 0; i < n; i++) {
    const p0 = c[i * 3]!
    const p1 = c[i * 3 + 1]!
    const p2 = c[i * 3 + 2]!
    if (tag[i] === 'CURVE') {
      const to = { x: p2.x, y: p2.y }
      segments.push({ kind: 'cubic', from: prev, c1: { x: p0.x, y: p0.y }, c2: { x: p1.x, y: p1.y }, to })
      prev = to
    } else {
      const v = { x: p1.x, y: p1.y }
      const to = { x: p2.x, y: p2.y }
      segments.push({ kind: 'line', from: prev, to: v })
      segments.push({ kind: 'line', from: v, to })
      prev = to
    }
  }
  return { sign, segments }
}

/** Trace a 1-bit bitmap (1 = ink). Throws TooComplexError when over the node cap. */
export function traceBitmap(
  input: TraceInput,
  settings: Pick<PipelineSettings, 'speckFilterMm2' | 'cornerRounding' | 'curveTolerance'>,
  options: { nodeCap?: number } = {},
): Outline {
  const t0 = performance.now()
  const { bitmap, width, height, pxPerMm } = input
  if (bitmap.length !== width * height) throw new RangeError('Bitmap size does not match width × height.')
  const nodeCap = options.nodeCap ?? DEFAULT_NODE_CAP
  const parameters = traceParameters(settings, pxPerMm)
  const potrace = new Potrace({
    turnPolicy: parameters.turnPolicy,
    turdSize: parameters.turdSize,
    alphaMax: parameters.alphaMax,
    optCurve: parameters.optCurve,
    optTolerance: parameters.optTolerance,
    threshold: 128,
    blackOnWhite: true,
  })
  if (typeof potrace._bmToPathlist !== 'function' || typeof potrace._processPath !== 'function') {
    throw new Error('The installed potrace package lacks the internal stages this pipeline calls (expected potrace 2.1.8).')
  }
  const lum = new PotraceBitmap(width, height)
  for (let i = 0; i < bitmap.length; i++) lum.data[i] = bitmap[i] ? 0 : 255
  potrace._luminanceData = lum
  potrace._imageLoaded = true
  potrace._bmToPathlist()
  const paths = potrace._pathlist
  // Every closed curve has at least three segments: refuse early, before the costly stage.
  if (paths.length * 3 > nodeCap) throw new TooComplexError(paths.length * 3, nodeCap)
  for (const path of paths) {
    const p = path.pt[0]!
    path.sign = bitmap[p.y * width + p.x] ? '+' : '-'
  }
  potrace._processPath()
  potrace._processed = true

  const curves: ClosedCurve[] = []
  let nodeCount = 0
  for (const path of paths) {
    const curve = toCurve(path, path.sign === '+' ? 1 : -1)
    nodeCount += curve.segments.length
    curves.push(curve)
  }
  if (nodeCount > nodeCap) throw new TooComplexError(nodeCount, nodeCap)
  return {
    curves,
    pathData: curvesToPathData(curves),
    width, height, pxPerMm, nodeCount, parameters,
    timings: { traceMs: performance.now() - t0 },
  }
}

/** The raw outline as an SVG in prepared-bitmap pixels (for storage and debugging). */
export function outlineToSvg(outline: Outline): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${outline.width}" height="${outline.height}" viewBox="0 0 ${outline.width} ${outline.height}">`
    + `<path d="${outline.pathData}" fill="#000" fill-rule="evenodd"/></svg>\n`
}
