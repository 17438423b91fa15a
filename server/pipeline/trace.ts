// Outline: the prepared bitmap traced into closed curves with the npm port of potrace.
//
// Potrace works in two stages: decomposition of the bitmap into closed boundary paths (with
// the speck filter), then, for each path, the optimal polygon, vertex adjustment, corner and
// curve smoothing and curve joining. The second stage is the npm port's own (its private
// method _processPath, potrace 2.1.8, pinned in package.json; trace.test.ts fails loudly if it
// changes), with its inner functions made once per process (portStage). The first is
// decompose.ts: the port's decomposition step for step, but with the outside of the image read
// as paper (the port read the pixel past the right edge as the next row's first, making phantom
// slivers where ink touched the left edge), on a typed working copy, with objects only for the
// paths kept.
//
// Each path is smoothed into curves as soon as it is found (very long ones last), so the node
// cap stops a drawing while it is traced, and memory holds the working data of one path at a
// time (and the points of the very long ones waiting).
//
// The port decides a path's sign on its XOR-filled working copy, where every path is "+";
// decompose.ts reads it from the original bitmap at the path's first pixel, as potrace does,
// so holes are marked and, as in potrace, reversed.
//
// Synchronous and pure: safe to call from a worker thread.
import { createRequire } from 'node:module'
import { decompose, type PortPath } from './decompose'
import { DEFAULT_NODE_CAP, TooComplexError } from './errors'
import type { PipelineSettings } from '../../shared/utils/settings'

const require = createRequire(import.meta.url)

interface PtPoint { x: number, y: number }
interface PtCurve { n: number, tag: Array<'CURVE' | 'CORNER'>, c: PtPoint[] }
type PtPath = PortPath & { curve: PtCurve }
interface PtInstance {
  _params: Record<string, unknown>
  _processPath(this: object): void
}
type PtConstructor = new (options: Record<string, unknown>) => PtInstance

const Potrace = (require('potrace') as { Potrace: PtConstructor }).Potrace

type ProcessPath = (this: { _params: Record<string, unknown>, _pathlist: PortPath[] }) => void

/** The port's helpers declared inside its curve-fitting functions; each takes all it uses as arguments. */
const NESTED_HELPERS = ['penalty3', 'pointslope', 'opti_penalty']

/** The declaration `function name(…) {…}` in src: its start and the index past its closing brace. */
function declarationAt(src: string, name: string): { start: number, end: number } | null {
  const start = src.indexOf(`function ${name}(`)
  let i = start < 0 ? -1 : src.indexOf('{', start)
  if (i < 0) return null
  for (let depth = 0; i < src.length; i++) {
    if (src[i] === '{') depth++
    else if (src[i] === '}' && --depth === 0) return { start, end: i + 1 }
  }
  return null
}

/**
 * The port's _processPath with its curve-fitting functions made once per process. The port
 * declares them (and three helpers inside them) within _processPath, so every call made new
 * closures; V8 keeps a closure's optimised code only while some closure of it lives, so after
 * each full garbage collection (one or two per upload, from the image buffers) the next trace
 * ran unoptimised while the compiler threads rebuilt the same code: 3–4× slower, with the
 * second core busy compiling. Rebuilt here from the port's own source text, the functions
 * hoisted into a scope made once, in strict mode as the port is, against the port's own
 * modules. `self` is set for each call and kept until the next: the last path's objects keep
 * alive the object shapes the compiled code was built for. Let go, a full collection took
 * those shapes and their code with them, and the next trace again ran cold (the 4 MP bench
 * drawing after a forced collection: 35–130 ms, against 27–50 ms kept). The cost is one
 * path's objects per thread between traces.
 * trace.test.ts checks that it traces exactly as the port's method; null (and the port's
 * method used) when the source does not have the expected shape.
 */
function processPathOnce(): ProcessPath | null {
  const src = portProcessPath.toString()
  const SELF = 'var self = this;', LOOP = 'for (var i = 0; i < this._pathlist.length; i++) {'
  const head = src.indexOf(SELF), loop = src.lastIndexOf(LOOP)
  if (!src.startsWith('function') || head < 0 || loop < head) return null
  let decls = src.slice(head + SELF.length, loop)
  const helpers: string[] = []
  for (const name of NESTED_HELPERS) {
    const at = declarationAt(decls, name)
    if (!at) return null
    helpers.push(decls.slice(at.start, at.end))
    decls = decls.slice(0, at.start) + decls.slice(at.end)
  }
  const body = src.slice(loop, src.lastIndexOf('}'))
  try {
    const lib = (m: string) => require(`potrace/lib/${m}`) as unknown
    const make = new Function('Curve', 'Opti', 'Point', 'Quad', 'Sum', 'utils',
      `'use strict';\nvar self;\n${helpers.join('\n')}\n${decls}\nreturn function processPath() { self = this; ${body} }`)
    return make(lib('types/Curve'), lib('types/Opti'), lib('types/Point'), lib('types/Quad'), lib('types/Sum'), lib('utils')) as ProcessPath
  } catch {
    return null
  }
}

const portProcessPath = (Potrace as unknown as { prototype: { _processPath: ProcessPath } }).prototype._processPath

/** The port's second stage as traceBitmap calls it: made once when it can be, else the port's own method (a property, so tests can watch it). */
export const portStage: { processPath: ProcessPath, madeOnce: boolean } = (() => {
  const once = typeof portProcessPath === 'function' ? processPathOnce() : null
  return { processPath: once ?? portProcessPath, madeOnce: once !== null }
})()

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
/** The three ASCII digits of 0…999, with leading zeros. */
const DIGITS3 = (() => {
  const t = new Uint8Array(3000)
  for (let n = 0; n < 1000; n++) { t[3 * n] = 48 + Math.floor(n / 100); t[3 * n + 1] = 48 + (Math.floor(n / 10) % 10); t[3 * n + 2] = 48 + (n % 10) }
  return t
})()

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
    let end = this.len + places
    this.len = end
    while (places >= 3) { end -= 3; places -= 3; const t = (frac % 1000) * 3; b[end] = DIGITS3[t]!; b[end + 1] = DIGITS3[t + 1]!; b[end + 2] = DIGITS3[t + 2]!; frac = Math.floor(frac / 1000) }
    while (places > 0) { b[--end] = 48 + (frac % 10); frac = Math.floor(frac / 10); places-- }
  }

  private digits(n: number): void {
    const b = this.buf
    if (n < 1000) {
      // the usual case: a coordinate below 1000, written from the table without leading zeros
      const t = n * 3
      if (n >= 100) b[this.len++] = DIGITS3[t]!
      if (n >= 10) b[this.len++] = DIGITS3[t + 1]!
      b[this.len++] = DIGITS3[t + 2]!
      return
    }
    let m = n, count = 1
    while (m >= 10) { m = Math.floor(m / 10); count++ }
    const end = this.len + count
    for (let i = end - 1; i >= this.len; i--) { b[i] = 48 + (n % 10); n = Math.floor(n / 10) }
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

// The port's points are used as they are (each is made for its curve and not changed after).
function toCurve(path: PtPath, sign: 1 | -1): ClosedCurve {
  const { n, tag, c } = path.curve
  const segments: Segment[] = []
  let prev: Point = c[(n - 1) * 3 + 2]!
  for (let i = 0; i < n; i++) {
    const to = c[i * 3 + 2]!
    if (tag[i] === 'CURVE') {
      segments.push({ kind: 'cubic', from: prev, c1: c[i * 3]!, c2: c[i * 3 + 1]!, to })
    } else {
      const v = c[i * 3 + 1]!
      segments.push({ kind: 'line', from: prev, to: v })
      segments.push({ kind: 'line', from: v, to })
    }
    prev = to
  }
  return { sign, segments }
}

/** Boundary points from which a path counts as very long (smoothed last). */
const LONG_PATH_POINTS = 20_000

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
  })
  if (typeof potrace._processPath !== 'function' || !potrace._params) {
    throw new Error('The installed potrace package lacks the internal stage this pipeline calls (expected potrace 2.1.8).')
  }
  const curves: ClosedCurve[] = []
  let nodeCount = 0
  // _processPath smooths every path of this._pathlist: here a list of one.
  const single = { _params: potrace._params, _pathlist: [] as PortPath[] }
  const smooth = (path: PortPath, index: number) => {
    single._pathlist[0] = path
    portStage.processPath.call(single)
    const curve = toCurve(path as PtPath, path.sign === '+' ? 1 : -1)
    nodeCount += curve.segments.length
    if (nodeCount > nodeCap) throw new TooComplexError(nodeCap, nodeCap)
    curves[index] = curve
  }
  // Very long paths (a ragged blob of paper texture) take seconds each to smooth: they wait
  // until the rest is done, so a drawing that is over the cap anyway is refused without them.
  const long: Array<{ path: PortPath, index: number }> = []
  let found = 0
  decompose(bitmap, width, height, parameters.turdSize, (path) => {
    const index = found++
    if (path.len > LONG_PATH_POINTS) long.push({ path, index })
    else smooth(path, index)
  })
  for (const { path, index } of long) smooth(path, index)
  return {
    curves,
    width, height, pxPerMm, nodeCount, parameters,
    timings: { traceMs: performance.now() - t0 },
  }
}

/** The raw outline as an SVG in prepared-bitmap pixels, 3 decimals (for storage and debugging). */
export function outlineToSvg(outline: Pick<Outline, 'curves' | 'width' | 'height'>): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${outline.width}" height="${outline.height}" viewBox="0 0 ${outline.width} ${outline.height}">`
    + `<path d="${curvesToPathData(outline.curves)}" fill="#000" fill-rule="evenodd"/></svg>\n`
}
