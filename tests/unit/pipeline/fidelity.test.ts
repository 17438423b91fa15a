import { describe, expect, it } from 'vitest'
import { cleanVector } from '../../../server/pipeline/clean'
import { measureCurves } from '../../../server/pipeline/geometry'
import { fidelity, intersectionOverUnion, outlineFidelity, rasteriseCurves, rasteriseSvg, svgCoverage } from '../../../server/pipeline/fidelity'
import { prepareBitmap } from '../../../server/pipeline/prepare'
import { parsePathData } from '../../../server/pipeline/svgpath'
import { traceBitmap, type ClosedCurve } from '../../../server/pipeline/trace'
import { svgDoc, svgToPng } from './helpers'

const curvesOf = (d: string): ClosedCurve[] => parsePathData(d).map((p) => ({ sign: 1, segments: p.segments }))

// Shapes with curves, sharp points, holes and islands in holes.
const DRAWING = svgDoc(500, 360, '<circle cx="110" cy="120" r="90"/><circle cx="110" cy="120" r="40" fill="#fff"/><circle cx="110" cy="120" r="15"/>'
  + '<polygon points="300,20 329,110 424,110 347,166 376,256 300,200 224,256 253,166 176,110 271,110"/>'
  + '<path d="M40 300 C140 200 260 380 470 280" stroke="#000" stroke-width="11" fill="none"/><ellipse cx="400" cy="320" rx="60" ry="18" transform="rotate(-8 400 320)"/>')

describe('our rasteriser', () => {
  it('puts mm coordinates on the pixel grid exactly and follows the half-covered rule', () => {
    // 10 px/mm; a rectangle from (1, 1) to (4, 3) mm covers pixels x 10…39, y 10…29.
    const r = rasteriseCurves(curvesOf('M1 1H4V3H1Z'), 100, 50, 10)
    const expected = new Uint8Array(100 * 50)
    for (let y = 10; y < 30; y++) for (let x = 10; x < 40; x++) expected[y * 100 + x] = 1
    expect(intersectionOverUnion(r, expected).iou).toBe(1)
    // from x = 1.06 mm column 10 is 40 % covered (paper), from 1.04 mm 60 % (ink)
    expect(rasteriseCurves(curvesOf('M1.06 1H4V3H1.06Z'), 100, 50, 10)[15 * 100 + 10]).toBe(0)
    expect(rasteriseCurves(curvesOf('M1.04 1H4V3H1.04Z'), 100, 50, 10)[15 * 100 + 10]).toBe(1)
    // even-odd: a square hole in a square, an island in the hole
    const nested = rasteriseCurves(curvesOf('M0 0H10V10H0Z M2 2H8V8H2Z M4 4H6V6H4Z'), 10, 10)
    expect([nested[0], nested[2 * 10 + 2], nested[3 * 10 + 3], nested[4 * 10 + 4], nested[5 * 10 + 5]]).toEqual([1, 0, 0, 1, 1])
    // curves and shapes beyond the image are cut at its edges
    const big = rasteriseCurves(curvesOf('M-5 -5H15V15H-5Z'), 10, 10)
    expect(big.every((v) => v === 1)).toBe(true)
  })

  it('agrees with librsvg on traced drawings, pixel for pixel but for a few along the edges', async () => {
    // Reference: librsvg (through sharp), coverage-antialiased, a pixel is ink at alpha ≥ 128.
    const png = await svgToPng(DRAWING)
    for (const widthMm of [50, 83.3, 120]) {
      const prep = await prepareBitmap(png, { speckFilterMm2: 0.2 }, widthMm)
      const clean = cleanVector(traceBitmap(prep, prep.settings))
      const ref = await fidelity(clean.svg, prep)
      const ours = outlineFidelity(clean, prep)
      // Where the two disagree, librsvg itself finds the pixel between a quarter and three
      // quarters covered: its coverage is sampled (a few per cent either way), and where a sharp
      // corner ends inside a pixel the centre can be in while less than half is, or the other
      // way round. Those are a few of the pixels the outline passes through.
      const coverage = await svgCoverage(clean.svg, prep.width, prep.height)
      let differ = 0, worst = 0
      for (let i = 0; i < ours.raster.length; i++) {
        if (ours.raster[i] === ref.raster[i]) continue
        differ++
        worst = Math.max(worst, Math.abs(coverage[i]! - 127.5))
      }
      const outlinePx = measureCurves(clean.curvesMm, 1).cutLengthMm * prep.pxPerMm
      expect(worst, `${widthMm} mm`).toBeLessThan(64)
      expect(differ, `${widthMm} mm`).toBeLessThan(0.05 * outlinePx)
      expect(intersectionOverUnion(ours.raster, ref.raster).iou).toBeGreaterThan(0.998)
      expect(Math.abs(ours.iou - ref.iou)).toBeLessThan(0.002)
    }
  })

  it('rasterises the same shapes librsvg does from an SVG in mm', async () => {
    const d = 'M2 2C10 -4 30 8 38 2L38 28C30 22 10 34 2 28Z M12 10L28 10L20 22Z'
    const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="40mm" height="30mm" viewBox="0 0 40 30"><path d="${d}" fill-rule="evenodd"/></svg>`
    const ref = await rasteriseSvg(svg, 400, 300)
    const ours = rasteriseCurves(curvesOf(d), 400, 300, 10)
    expect(intersectionOverUnion(ours, ref).iou).toBeGreaterThan(0.999)
  })
})
