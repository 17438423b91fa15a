import { svgPathProperties } from 'svg-path-properties'
import { createRequire } from 'node:module'
import v8 from 'node:v8'
import vm from 'node:vm'
import { describe, expect, it, vi } from 'vitest'
import { cleanVector } from '../../../server/pipeline/clean'
import { TooComplexError } from '../../../server/pipeline/errors'
import { fidelity, intersectionOverUnion, rasteriseSvg } from '../../../server/pipeline/fidelity'
import { curveLength, measureCurves } from '../../../server/pipeline/geometry'
import { prepareBitmap } from '../../../server/pipeline/prepare'
import { parsePathData } from '../../../server/pipeline/svgpath'
import { portStage, speckFilterToTurdSize, traceBitmap } from '../../../server/pipeline/trace'
import { mulberry32, runPotrace, svgDoc, svgToPng } from './helpers'

// A test drawing: a disc with a hole, a letter-like A with its counter, a tilted bar, a thick
// stroked curve, a star, an ellipse with an elliptical hole, and three specks.
const DRAWING = svgDoc(640, 460, `<circle cx="120" cy="130" r="90"/><circle cx="120" cy="130" r="35" fill="#fff"/>
  <path d="M260 40 L330 220 L300 220 L285 175 L235 175 L220 220 L190 220 Z M245 150 L277 150 L260 100 Z"/>
  <rect x="360" y="40" width="40" height="180" transform="rotate(12 380 130)"/>
  <path d="M430 60 C520 0 600 120 500 160 S440 260 580 230" stroke="#000" stroke-width="18" fill="none"/>
  <polygon points="100,300 120,350 175,350 130,380 150,430 100,400 50,430 70,380 25,350 80,350"/>
  <ellipse cx="330" cy="350" rx="110" ry="45"/><ellipse cx="330" cy="350" rx="60" ry="15" fill="#fff"/>
  <circle cx="520" cy="350" r="2.5"/><circle cx="560" cy="350" r="5"/><rect x="480" y="400" width="3" height="3"/>`)
const SETTINGS = { speckFilterMm2: 0.3, cornerRounding: 1, curveTolerance: 0.2 }

function pathDataOf(svg: string): string[] {
  return [...svg.matchAll(/\sd="([^"]*)"/g)].map((m) => m[1]!)
}

describe('trace', () => {
  it('feeds the bitmap straight to the tracer and marks holes', async () => {
    const prep = await prepareBitmap(await svgToPng(DRAWING), SETTINGS, 64)
    const outline = traceBitmap(prep, prep.settings)
    const m = measureCurves(outline.curves, prep.pxPerMm)
    // disc, A, bar, stroke, star, ellipse, the 5 px-radius speck (≈ 78 px² > 30 px² turdsize);
    // the 2.5 px-radius speck (≈ 20 px²) and the 3 × 3 px one are dropped
    expect(m.pieces).toBe(7)
    expect(m.holes).toBe(3) // disc hole, the A's counter, ellipse hole
    expect(outline.parameters.turdSize).toBe(30) // 0.3 mm² × (10 px/mm)²
  })

  it('converts the speck filter from mm² to px² at the prepared resolution', async () => {
    expect(speckFilterToTurdSize(0.5, 10)).toBe(50)
    expect(speckFilterToTurdSize(0.5, 11.3)).toBe(Math.round(0.5 * 11.3 * 11.3))
    expect(speckFilterToTurdSize(0, 10)).toBe(0)
    // A 6 × 6 px speck at 10 px/mm is 0.36 mm²: dropped by a 0.5 mm² filter, kept by 0.3 mm².
    const png = await svgToPng(svgDoc(100, 100, '<rect x="20" y="20" width="6" height="6"/><rect x="50" y="50" width="30" height="30"/>'))
    const prep = await prepareBitmap(png, {}, 10)
    expect(traceBitmap(prep, { ...SETTINGS, speckFilterMm2: 0.5 }).curves).toHaveLength(1)
    expect(traceBitmap(prep, { ...SETTINGS, speckFilterMm2: 0.3 }).curves).toHaveLength(2)
  })

  it('matches Debian\'s potrace on the same bitmap with the same parameters', async () => {
    // Reference implementation: P. Selinger's potrace (Debian package "potrace"), same bitmap as
    // PBM, same turdsize (-t), alphamax (-a), opttolerance (-O), default turn policy (minority).
    const prep = await prepareBitmap(await svgToPng(DRAWING), SETTINGS, 64)
    const outline = traceBitmap(prep, prep.settings)
    const clean = cleanVector(outline)
    const dpi = prep.pxPerMm * 25.4 // one bitmap pixel = 1/dpi inch, so the output is in real size
    const p = outline.parameters
    const theirs = runPotrace(prep.bitmap, prep.width, prep.height,
      ['-s', '-t', String(p.turdSize), '-a', String(p.alphaMax), '-O', String(p.optTolerance), '-r', String(dpi)])

    // Identical physical size. Their size is in pt: W3C CSS Values and Units Level 3, 1in = 25.4mm;
    // 1pt = 1/72in (from memory).
    const w = Number(/\swidth="([\d.]+)pt"/.exec(theirs)![1]) * 25.4 / 72
    const h = Number(/\sheight="([\d.]+)pt"/.exec(theirs)![1]) * 25.4 / 72
    expect(Math.abs(w - clean.widthMm)).toBeLessThan(0.01)
    expect(Math.abs(h - clean.heightMm)).toBeLessThan(0.01)
    expect(/\swidth="64mm"/.test(clean.svg)).toBe(true)

    // Fidelity of both, rasterised at the bitmap's resolution, within 0.002 of each other.
    const ours = await fidelity(clean.svg, prep)
    const ref = await fidelity(theirs, prep)
    expect(ours.iou).toBeGreaterThan(0.98)
    expect(Math.abs(ours.iou - ref.iou)).toBeLessThanOrEqual(0.002)
    // and the two outlines cover nearly the same pixels
    expect(intersectionOverUnion(ours.raster, ref.raster).iou).toBeGreaterThan(0.995)

    // Node counts: the npm package is a line-by-line port of the same algorithm, so the counts
    // should agree closely. Allowed: 2 % + 2 nodes, for segments that the reference's output
    // quantisation (1/10 px) or our 0.01 mm rounding and svgo's merging of collinear lines
    // can make vanish or appear.
    let theirNodes = 0, theirCurves = 0
    for (const d of pathDataOf(theirs)) for (const sp of parsePathData(d)) { theirNodes += sp.segments.length; theirCurves++ }
    expect(theirCurves).toBe(outline.curves.length)
    expect(Math.abs(theirNodes - outline.nodeCount)).toBeLessThanOrEqual(0.02 * theirNodes + 2)
  })
})

describe('clean vector', () => {
  it('keeps mm sizes and viewBox, 0.01 mm grid, evenodd', async () => {
    const prep = await prepareBitmap(await svgToPng(DRAWING), SETTINGS, 64)
    const outline = traceBitmap(prep, prep.settings)
    const clean = cleanVector(outline)
    // SVG 1.1 (Second Edition) §7: width/height with unit identifiers; viewBox maps user units
    expect(clean.svg).toMatch(/^<svg [^>]*width="64mm"/)
    expect(clean.svg).toMatch(/^<svg [^>]*height="46mm"/)
    expect(clean.svg).toMatch(/^<svg [^>]*viewBox="0 0 64 46"/)
    expect(clean.svg).toMatch(/fill-rule="evenodd"/)
    expect(clean.svg).not.toMatch(/\sid=|<metadata|<!--/)
    for (const d of pathDataOf(clean.svg)) expect(d).not.toMatch(/[Aa]/) // no arcs made from curves

    // Every end point svgo wrote lies on our 0.01 mm grid (within svgo's 0.001 rounding) and
    // is one of our end points.
    const ours = new Set<string>()
    for (const c of clean.curvesMm) for (const s of c.segments) ours.add(`${s.to.x.toFixed(2)},${s.to.y.toFixed(2)}`)
    let count = 0
    for (const d of pathDataOf(clean.svg)) {
      for (const sp of parsePathData(d)) {
        for (const s of sp.segments) {
          const gx = Math.round(s.to.x * 100) / 100, gy = Math.round(s.to.y * 100) / 100
          expect(Math.abs(s.to.x - gx)).toBeLessThanOrEqual(0.0015)
          expect(Math.abs(s.to.y - gy)).toBeLessThanOrEqual(0.0015)
          expect(ours.has(`${gx.toFixed(2)},${gy.toFixed(2)}`)).toBe(true)
          count++
        }
      }
    }
    expect(count).toBeGreaterThan(50)
  })

  it('cut length agrees with svg-path-properties within 0.1 %', async () => {
    const prep = await prepareBitmap(await svgToPng(DRAWING), SETTINGS, 64)
    const outline = traceBitmap(prep, prep.settings)
    const clean = cleanVector(outline)
    const m = measureCurves(outline.curves, prep.pxPerMm)
    // svg-path-properties (npm), getTotalLength of the clean vector's path data (mm)
    let theirs = 0
    for (const d of pathDataOf(clean.svg)) theirs += new svgPathProperties(d).getTotalLength()
    expect(Math.abs(m.cutLengthMm / theirs - 1)).toBeLessThan(0.001)
    // and our own reading of the svgo output gives the same length
    let reread = 0
    for (const d of pathDataOf(clean.svg)) for (const sp of parsePathData(d)) reread += curveLength(sp)
    expect(Math.abs(reread / theirs - 1)).toBeLessThan(0.0001)
  })

  it('is deterministic: same input and settings, byte-identical SVG', async () => {
    const png = await svgToPng(DRAWING)
    const run = async () => {
      const prep = await prepareBitmap(png, { ...SETTINGS, lightingEvening: { enabled: true, strength: 0.7 } }, 64)
      return cleanVector(traceBitmap(prep, prep.settings)).svg
    }
    const a = await run()
    const b = await run()
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true)
  })

  it('throws TooComplexError on a noisy bitmap, before svgo', () => {
    const rnd = mulberry32(3)
    const width = 500, height = 500
    const bitmap = new Uint8Array(width * height).map(() => (rnd() < 0.5 ? 1 : 0))
    let err: unknown
    try { traceBitmap({ bitmap, width, height, pxPerMm: 10 }, { ...SETTINGS, speckFilterMm2: 0 }) } catch (e) { err = e }
    expect(err).toBeInstanceOf(TooComplexError)
    expect((err as Error).message).toMatch(/speck filter/)
    expect((err as Error).message).toMatch(/curve tolerance/)

    // cleanVector's own guard, on an outline that slipped past: refuses before optimising.
    const segments = Array.from({ length: 70_000 }, (_, i) => ({ kind: 'line' as const, from: { x: i % 500, y: 1 }, to: { x: (i + 1) % 500, y: 2 } }))
    const t0 = performance.now()
    expect(() => cleanVector({ curves: [{ sign: 1, segments }], width: 500, height: 500, pxPerMm: 10 })).toThrow(TooComplexError)
    expect(performance.now() - t0).toBeLessThan(200)
  })
})

describe('the node cap', () => {
  it('stops a drawing while it is traced, smoothing long paths last', () => {
    // Counted on the port's second stage (its _processPath, as traceBitmap calls it), one call per path.
    const calls: number[] = []
    const original = portStage.processPath
    const spy = vi.spyOn(portStage, 'processPath').mockImplementation(function (this: ThisParameterType<typeof original>) {
      calls.push(this._pathlist[0]!.len)
      original.call(this)
    })
    try {
      // a ragged band across the top (one path of over 20,000 points), then 40 × 40 dots below
      const width = 1200, height = 1000
      const bitmap = new Uint8Array(width * height)
      for (let x = 0; x < width; x++) for (let y = 0; y < 40 + 30 * ((x >> 1) & 1); y++) bitmap[y * width + x] = 1
      for (let i = 0; i < 40; i++) for (let j = 0; j < 40; j++) {
        for (let y = 0; y < 8; y++) for (let x = 0; x < 8; x++) bitmap[(120 + j * 20 + y) * width + 20 + i * 25 + x] = 1
      }
      const all = traceBitmap({ bitmap, width, height, pxPerMm: 10 }, { ...SETTINGS, speckFilterMm2: 0 })
      expect(all.curves).toHaveLength(1601)
      expect(calls[calls.length - 1]).toBeGreaterThan(20_000) // the long path went last
      const curves = all.curves.map((c) => c.segments.length)
      calls.length = 0
      expect(() => traceBitmap({ bitmap, width, height, pxPerMm: 10 }, { ...SETTINGS, speckFilterMm2: 0 }, { nodeCap: 400 })).toThrow(TooComplexError)
      // refused after about as many dots as the cap allows, without the long path
      expect(calls.length).toBeLessThan(400 / Math.min(...curves) + 2)
      expect(Math.max(...calls)).toBeLessThan(20_000)
    } finally {
      spy.mockRestore()
    }
  })
})

describe('the port\'s second stage, made once', () => {
  const port = (createRequire(import.meta.url)('potrace') as { Potrace: { prototype: { _processPath: typeof portStage.processPath } } }).Potrace.prototype

  it('is used instead of the port\'s method, which makes its functions anew on every call', () => {
    // The port declares its curve-fitting functions inside _processPath. V8 keeps a closure's
    // optimised code only while a closure of it lives, so with the port's method every trace
    // after a full garbage collection ran unoptimised (measured with a forced full collection
    // before each trace of the bench's 4 MP drawing: 81 ms against 32 ms made once; npm run bench
    // prints the latter beside Debian potrace). Made once, the functions and their code live on.
    expect(portStage.madeOnce).toBe(true)
    expect(portStage.processPath).not.toBe(port._processPath)
    const spy = vi.spyOn(port, '_processPath')
    try {
      traceBitmap({ bitmap: new Uint8Array(100).fill(1, 22, 28), width: 10, height: 10, pxPerMm: 1 }, { ...SETTINGS, speckFilterMm2: 0 })
      expect(spy).not.toHaveBeenCalled()
    } finally {
      spy.mockRestore()
    }
  })

  it('traces exactly as the port\'s own method', async () => {
    // Reference: the port's _processPath itself, on the same paths: every curve, tag and point
    // identical, on the test drawing, noise and fine dots, at sharp and round corners and two
    // curve tolerances.
    const prep = await prepareBitmap(await svgToPng(DRAWING), SETTINGS, 64)
    const rnd = mulberry32(7)
    const noise = { bitmap: new Uint8Array(300 * 200).map(() => (rnd() < 0.45 ? 1 : 0)), width: 300, height: 200, pxPerMm: 10 }
    const dots = { bitmap: new Uint8Array(400 * 400), width: 400, height: 400, pxPerMm: 10 }
    for (let y = 0; y < 400; y++) for (let x = 0; x < 400; x++) dots.bitmap[y * 400 + x] = ((x - 5) % 13) ** 2 + ((y - 5) % 11) ** 2 < 20 ? 1 : 0
    const once = portStage.processPath
    let compared = 0
    for (const input of [prep, noise, dots]) {
      for (const settings of [SETTINGS, { speckFilterMm2: 0, cornerRounding: 0.2, curveTolerance: 0 }, { speckFilterMm2: 0.05, cornerRounding: 1.3, curveTolerance: 1 }]) {
        const ours = traceBitmap(input, settings)
        portStage.processPath = port._processPath
        try {
          expect(traceBitmap(input, settings).curves).toEqual(ours.curves)
        } finally {
          portStage.processPath = once
        }
        compared += ours.nodeCount
      }
    }
    expect(compared).toBeGreaterThan(10_000)
  })

  it('keeps its last path until the next trace, so a full collection leaves its compiled code', async () => {
    // Let go, the last path's objects took the object shapes the compiled code was built for
    // with them at the next full collection, and the trace after it ran cold: on the bench's
    // 4 MP drawing after a forced collection 35–130 ms let go, 27–50 ms kept (npm run bench
    // prints it beside Debian potrace). Here: the last path still lives after a collection.
    v8.setFlagsFromString('--expose-gc')
    const gc = vm.runInNewContext('gc') as () => void
    const once = portStage.processPath
    let last: WeakRef<object> | undefined
    portStage.processPath = function (this: ThisParameterType<typeof once>) {
      last = new WeakRef(this._pathlist[0]!)
      return once.call(this)
    }
    try {
      traceBitmap(await prepareBitmap(await svgToPng(DRAWING), SETTINGS, 64), SETTINGS)
    } finally {
      portStage.processPath = once
    }
    await new Promise((resolve) => setTimeout(resolve, 0)) // a WeakRef holds its target to the end of the task that made it
    gc()
    expect(last?.deref()).toBeDefined()
  })
})

describe('fidelity', () => {
  it('rasterises mm coordinates onto the bitmap\'s pixel grid exactly', async () => {
    // 10 mm × 5 mm at 10 px/mm; a rectangle from (1, 1) to (4, 3) mm covers pixels x 10…39, y 10…29.
    const svg = '<svg xmlns="http://www.w3.org/2000/svg" width="10mm" height="5mm" viewBox="0 0 10 5"><path d="M1 1H4V3H1Z"/></svg>'
    const r = await rasteriseSvg(svg, 100, 50)
    const expected = new Uint8Array(100 * 50)
    for (let y = 10; y < 30; y++) for (let x = 10; x < 40; x++) expected[y * 100 + x] = 1
    expect(intersectionOverUnion(r, expected).iou).toBe(1)
    // partly covered pixels follow the 50 % coverage rule: from x = 1.06 mm, column 10 is 40 % covered
    const half = await rasteriseSvg(svg.replace('M1 1H4V3H1Z', 'M1.06 1H4V3H1.06Z'), 100, 50)
    expect(half[15 * 100 + 10]).toBe(0)
    const more = await rasteriseSvg(svg.replace('M1 1H4V3H1Z', 'M1.04 1H4V3H1.04Z'), 100, 50)
    expect(more[15 * 100 + 10]).toBe(1) // 60 % covered
  })

  it('scores a traced disc close to 1 and a shifted one lower', async () => {
    const png = await svgToPng(svgDoc(400, 400, '<circle cx="200" cy="200" r="150"/>'))
    const prep = await prepareBitmap(png, {}, 40)
    const clean = cleanVector(traceBitmap(prep, prep.settings))
    const f = await fidelity(clean.svg, prep)
    expect(f.iou).toBeGreaterThan(0.995)
    const shifted = clean.svg.replace('viewBox="0 0 40 40"', 'viewBox="-1 0 40 40"')
    expect((await fidelity(shifted, prep)).iou).toBeLessThan(0.95)
  })
})
