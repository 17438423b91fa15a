// Outline: the prepared bitmap traced into closed curves with the npm port of potrace.
//
// The port normally decodes an image with Jimp and thresholds its own luminance copy. We skip
// that and run its two stages directly: _bmToPathlist (decomposition into boundary paths,
// speck filter) and _processPath (polygon, vertex adjustment, corner/curve smoothing, curve
// joining). These are private methods of potrace 2.1.8 (pinned in package.json); trace.test.ts
// fails loudly if they change.
//
// Three things are ours, each for a reason:
//  - The working bitmap. _bmToPathlist asks its luminance bitmap for a thresholded copy and
//    reads pixels through Bitmap.pointToIndex, whose range check lets x = width through: the
//    pixel just past the right edge is read as the first pixel of the next row, so ink touching
//    the left edge made phantom slivers along the right one. We hand it a stand-in (InkMap)
//    with the same fields and methods that reads everything outside the image as paper, as
//    the reference C tracer does, and that gives our 0/1 bitmap as the thresholded copy.
//  - The sign. The port decides a path's sign (outer boundary of ink, or boundary of a hole)
//    from its working copy, which it XOR-fills as it goes, so every path comes out as "+".
//    Potrace's algorithm reads it from the original bitmap at the path's first pixel; we do
//    that, so holes are marked and, as in potrace, reversed.
//  - Streaming. Each boundary path is smoothed into curves as soon as the decomposition finds
//    it (the port's path list is replaced by a sink), so the node cap stops a drawing while it
//    is traced, and memory holds one path's working data at a time instead of every path's.
//
// Synchronous and pure: safe to call from a worker thread.
import { createRequire } from 'node:module'
import { DEFAULT_NODE_CAP, TooComplexError } from './errors'
import type { PipelineSettings } from '../../shared/utils/settings'

const require = createRequire(import.meta.url)

interface PtPoint { x: number, y: number }
interface PtCurve { n: number, tag: Array<'CURVE' | 'CORNER'>, c: PtPoint[] }
interface PtPath { pt: PtPoint[], sign: '+' | '-', area: number, len: number, curve: PtCurve }
interface PtInstance {
  _params: Record<string, unknown>
  _bmToPathlist(this: object): void
  _processPath(this: object): void
}
type PtConstructor = new (options: Record<string, unknown>) => PtInstance
type PtPointConstructor = new (x?: number, y?: number) => PtPoint

const potraceModule = require('potrace') as { Potrace: PtConstructor }
const PotracePoint = require('potrace/lib/types/Point.js') as PtPointConstructor
const Potrace = potraceModule.Potrace

/**
 * The decomposition's working bitmap (1 = ink, XOR-filled as paths are found), with the
 * methods _bmToPathlist calls on it. Pixels outside the image read as paper.
 */
class InkMap {
  readonly size: number
  constructor(readonly data: Uint8Array, readonly width: number, readonly height: number) {
    this.size = width * height
  }

  getValueAt(x: number, y: number): number {
    return x >= 0 && y >= 0 && x < this.width && y < this.height ? this.data[y * this.width + x]! : 0
  }

  pointToIndex(pointOrX: PtPoint | number, y?: number): number {
    const px = typeof pointOrX === 'number' ? pointOrX : pointOrX.x
    const py = typeof pointOrX === 'number' ? y! : pointOrX.y
    return px >= 0 && py >= 0 && px < this.width && py < this.height ? py * this.width + px : -1
  }

  indexToPoint(index: number): PtPoint {
    if (index < 0 || index >= this.size) return new PotracePoint(-1, -1)
    const y = Math.floor(index / this.width)
    return new PotracePoint(index - y * this.width, y)
  }
}

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

// Path data is written as bytes into one buffer and decoded once: on a page of text (tens of
// thousands of segments) building it from number strings cost more than tracing.
class PathText {
  private buf = new Uint8Array(1 << 16)
  private len = 0

  private room(n: number): void {
    if (this.len + n <= this.buf.length) return
    const bigger = new Uint8Array(Math.max(this.buf.length * 2, this.len + n))
    bigger.set(this.buf.subarray(0, this.len))
    this.buf = bigger
  }

  char(c: number): void {
    this.room(1)
    this.buf[this.len++] = c
  }

  /** v rounded half up to `decimals` places (on v·10^decimals), without trailing zeros or "-0". */
  number(v: number, decimals: number, scale: number): void {
    const k = Math.round(v * scale)
    this.room(24 + decimals)
    const b = this.buf
    if (k === 0) { b[this.len++] = 48; return }
    if (!Number.isSafeInteger(k)) throw new RangeError(`Coordinate ${v} is out of range.`)
    let a = k
    if (a < 0) { b[this.len++] = 45; a = -a }
    const whole = Math.floor(a / scale)
    let frac = a - whole * scale
    this.digits(whole)
    if (frac === 0) return
    let places = decimals
    while (frac % 10 === 0) { frac /= 10; places-- }
    b[this.len++] = 46
    const end = this.len + places
    for (let i = end - 1; i >= this.len; i--) { b[i] = 48 + (frac % 10); frac = Math.floor(frac / 10) }
    this.len = end
  }

  private digits(n: number): void {
    let m = n, count = 1
    while (m >= 10) { m = Math.floor(m / 10); count++ }
    const end = this.len + count
    for (let i = end - 1; i >= this.len; i--) { this.buf[i] = 48 + (n % 10); n = Math.floor(n / 10) }
    this.len = end
  }

  toString(): string {
    return Buffer.from(this.buf.buffer, this.buf.byteOffset, this.len).toString('latin1')
  }
}

const M = 77, L = 76, C = 67, Z = 90, SPACE = 32

/**
 * SVG path data of closed curves, absolute commands, each coordinate rounded half up to
 * `decimals` places and printed without trailing zeros (so the same curves give the same text).
 */
export function curvesToPathData(curves: ClosedCurve[], decimals = 3): string {
  const out = new PathText()
  const scale = 10 ** decimals
  const pt = (p: Point, lead: number) => {
    out.char(lead)
    out.number(p.x, decimals, scale)
    out.char(SPACE)
    out.number(p.y, decimals, scale)
  }
  for (const curve of curves) {
    if (curve.segments.length === 0) continue
    pt(curve.segments[0]!.from, M)
    for (const seg of curve.segments) {
      if (seg.kind === 'line') pt(seg.to, L)
      else { pt(seg.c1, C); pt(seg.c2, SPACE); pt(seg.to, SPACE) }
    }
    out.char(Z)
  }
  return out.toString()
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
  if (typeof potrace._bmToPathlist !== 'function' || typeof potrace._processPath !== 'function' || !potrace._params) {
    throw new Error('The installed potrace package lacks the internal stages this pipeline calls (expected potrace 2.1.8).')
  }
  const params = potrace._params
  const curves: ClosedCurve[] = []
  let nodeCount = 0
  // _processPath smooths every path of this._pathlist: here a list of one.
  const single = { _params: params, _pathlist: [] as PtPath[] }
  const sink = {
    push(path: PtPath): void {
      const p = path.pt[0]!
      path.sign = bitmap[p.y * width + p.x] ? '+' : '-'
      single._pathlist[0] = path
      potrace._processPath.call(single)
      const curve = toCurve(path, path.sign === '+' ? 1 : -1)
      nodeCount += curve.segments.length
      if (nodeCount > nodeCap) throw new TooComplexError(nodeCap, nodeCap)
      curves.push(curve)
    },
  }
  // The working copy is XOR-filled by the decomposition: never our caller's bitmap.
  const ink = new InkMap(bitmap.slice(), width, height)
  const decomposition = {
    _params: params,
    _luminanceData: { copy: () => ink },
    get _pathlist() { return sink },
    set _pathlist(_list: unknown) { /* the stage starts with `this._pathlist = []`: keep the sink */ },
  }
  potrace._bmToPathlist.call(decomposition)
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
