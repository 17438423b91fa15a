import { svgPathProperties } from 'svg-path-properties'
import { describe, expect, it } from 'vitest'
import {
  curveLength, curveSignedArea, distanceTransform, measureCurves, narrowestFeature, narrowestFeatureMm,
  segmentLength, segmentSignedArea, smallPieces,
} from '../../../server/pipeline/geometry'
import { prepareBitmap } from '../../../server/pipeline/prepare'
import { traceBitmap, type ClosedCurve, type Segment } from '../../../server/pipeline/trace'
import { mulberry32, svgDoc, svgToBitmap, svgToPng } from './helpers'

const P = (x: number, y: number) => ({ x, y })
const cubic = (a: number[], b: number[], c: number[], d: number[]): Segment =>
  ({ kind: 'cubic', from: P(a[0]!, a[1]!), c1: P(b[0]!, b[1]!), c2: P(c[0]!, c[1]!), to: P(d[0]!, d[1]!) })

/** Independent check: flatten a cubic into many chords (de Casteljau evaluation). */
function flatten(s: Extract<Segment, { kind: 'cubic' }>, n: number) {
  const pts = []
  for (let i = 0; i <= n; i++) {
    const t = i / n, u = 1 - t
    pts.push(P(
      u * u * u * s.from.x + 3 * u * u * t * s.c1.x + 3 * u * t * t * s.c2.x + t * t * t * s.to.x,
      u * u * u * s.from.y + 3 * u * u * t * s.c1.y + 3 * u * t * t * s.c2.y + t * t * t * s.to.y,
    ))
  }
  return pts
}

describe('Bézier area and length', () => {
  it('closed-form cubic area matches a finely flattened polygon (Green\'s theorem / shoelace)', () => {
    const rnd = mulberry32(5)
    for (let k = 0; k < 20; k++) {
      const pts = Array.from({ length: 4 }, () => [rnd() * 100 - 50, rnd() * 100 - 50])
      const s = cubic(pts[0]!, pts[1]!, pts[2]!, pts[3]!) as Extract<Segment, { kind: 'cubic' }>
      const poly = flatten(s, 20000)
      let a = 0
      for (let i = 0; i + 1 < poly.length; i++) a += (poly[i]!.x * poly[i + 1]!.y - poly[i + 1]!.x * poly[i]!.y) / 2
      expect(segmentSignedArea(s)).toBeCloseTo(a, 4)
      let l = 0
      for (let i = 0; i + 1 < poly.length; i++) l += Math.hypot(poly[i + 1]!.x - poly[i]!.x, poly[i + 1]!.y - poly[i]!.y)
      expect(segmentLength(s)).toBeCloseTo(l, 3)
    }
  })

  it('a square of straight cubics has area side² and length 4 × side (handbook geometry)', () => {
    const straight = (a: number[], b: number[]) => cubic(a, [a[0]! + (b[0]! - a[0]!) / 4, a[1]! + (b[1]! - a[1]!) / 4], [a[0]! + (b[0]! - a[0]!) * 0.9, a[1]! + (b[1]! - a[1]!) * 0.9], b)
    const sq: ClosedCurve = { sign: 1, segments: [straight([0, 0], [3, 0]), straight([3, 0], [3, 3]), straight([3, 3], [0, 3]), straight([0, 3], [0, 0])] }
    expect(Math.abs(curveSignedArea(sq))).toBeCloseTo(9, 12)
    expect(curveLength(sq)).toBeCloseTo(12, 9)
  })

  it('cubic length agrees with svg-path-properties', () => {
    const d = 'M10 10C40 -20 90 80 120 10'
    const ours = segmentLength(cubic([10, 10], [40, -20], [90, 80], [120, 10]))
    expect(ours).toBeCloseTo(new svgPathProperties(d).getTotalLength(), 2)
  })
})

describe('traced discs', () => {
  // Handbook geometry: disc area πr², circumference 2πr; annulus area π(R² − r²), boundary 2π(R + r).
  it('a disc of r = 20 mm at 10 px/mm: area within 0.5 % of πr², length within 0.5 % of 2πr', async () => {
    const png = await svgToPng(svgDoc(500, 500, '<circle cx="250" cy="250" r="200" fill="#000"/>'))
    const prep = await prepareBitmap(png, {}, 50)
    expect(prep.pxPerMm).toBe(10)
    const outline = traceBitmap(prep, prep.settings)
    const m = measureCurves(outline.curves, prep.pxPerMm)
    const r = 20
    expect(Math.abs(m.inkAreaMm2 / (Math.PI * r * r) - 1)).toBeLessThan(0.005)
    expect(Math.abs(m.cutLengthMm / (2 * Math.PI * r) - 1)).toBeLessThan(0.005)
    expect(m.pieces).toBe(1)
    expect(m.holes).toBe(0)
    expect(Math.abs(m.bounds!.maxX - m.bounds!.minX - 40)).toBeLessThan(0.1)
  })

  it('a disc with a concentric hole: π(R² − r²), 2π(R + r), one piece, one hole', async () => {
    const png = await svgToPng(svgDoc(500, 500, '<circle cx="250" cy="250" r="200" fill="#000"/><circle cx="250" cy="250" r="80" fill="#fff"/>'))
    const prep = await prepareBitmap(png, {}, 50)
    const outline = traceBitmap(prep, prep.settings)
    const m = measureCurves(outline.curves, prep.pxPerMm)
    const R = 20, r = 8
    expect(Math.abs(m.inkAreaMm2 / (Math.PI * (R * R - r * r)) - 1)).toBeLessThan(0.005)
    expect(Math.abs(m.cutLengthMm / (2 * Math.PI * (R + r)) - 1)).toBeLessThan(0.005)
    expect(m.pieces).toBe(1)
    expect(m.holes).toBe(1)
    // the hole runs the other way round: signed areas of opposite sign
    const [a, b] = outline.curves.map(curveSignedArea)
    expect(Math.sign(a!)).toBe(-Math.sign(b!))
    expect(m.nodeCount).toBe(outline.curves.reduce((n, c) => n + c.segments.length, 0))
  })

  it('lists pieces smaller than a given area', async () => {
    // 10 px/mm: a 1 mm × 1 mm square (1 mm²) and a 3 mm × 3 mm one (9 mm²)
    const png = await svgToPng(svgDoc(200, 100, '<rect x="20" y="20" width="10" height="10"/><rect x="100" y="20" width="30" height="30"/>'))
    const prep = await prepareBitmap(png, { speckFilterMm2: 0.1 }, 20)
    const outline = traceBitmap(prep, prep.settings)
    const small = smallPieces(outline.curves, prep.pxPerMm, 2)
    expect(small).toHaveLength(1)
    expect(small[0]!.areaMm2).toBeGreaterThan(0.8)
    expect(small[0]!.areaMm2).toBeLessThan(1.01)
  })
})

describe('distance transform and narrowest feature', () => {
  it('the distance transform is exact (against brute force)', () => {
    // Felzenszwalb & Huttenlocher 2012, Theory of Computing 8:415–428: the separable lower-
    // envelope transform is exact; brute force over all paper pixels must agree to the bit.
    const rnd = mulberry32(11)
    const w = 37, h = 23
    const bm = new Uint8Array(w * h).map(() => (rnd() < 0.8 ? 1 : 0))
    const dt = distanceTransform(bm, w, h)
    for (let y = 0; y < h; y++) {
      for (let x = 0; x < w; x++) {
        if (!bm[y * w + x]) { expect(dt[y * w + x]).toBe(0); continue }
        let best = Infinity
        // outside the image counts as paper
        for (let yy = -1; yy <= h; yy++) {
          for (let xx = -1; xx <= w; xx++) {
            const paper = xx < 0 || yy < 0 || xx >= w || yy >= h || !bm[yy * w + xx]
            if (paper) best = Math.min(best, (xx - x) ** 2 + (yy - y) ** 2)
          }
        }
        expect(dt[y * w + x]).toBe(Math.sqrt(best))
      }
    }
  })

  it('a 2 mm stroke at 10 px/mm measures 2 mm within one pixel', async () => {
    const { bitmap, width, height } = await svgToBitmap(svgDoc(400, 200, '<rect x="50" y="90" width="300" height="20"/>'))
    const mm = narrowestFeatureMm(bitmap, width, height, 10)!
    expect(Math.abs(mm - 2)).toBeLessThanOrEqual(0.1)
  })

  it('a slanted 2 mm stroke measures 2 mm within one pixel', async () => {
    const { bitmap, width, height } = await svgToBitmap(svgDoc(400, 300, '<rect x="50" y="140" width="300" height="20" transform="rotate(30 200 150)"/>'))
    const mm = narrowestFeatureMm(bitmap, width, height, 10)!
    expect(Math.abs(mm - 2)).toBeLessThanOrEqual(0.1)
  })

  it('of two strokes, the thinner one counts', async () => {
    const { bitmap, width, height } = await svgToBitmap(svgDoc(400, 300,
      '<rect x="50" y="40" width="300" height="30"/><rect x="50" y="150" width="300" height="12"/><circle cx="200" cy="240" r="40"/>'))
    const nf = narrowestFeature(bitmap, width, height, 10)!
    expect(Math.abs(nf.widthMm - 1.2)).toBeLessThanOrEqual(0.1)
    expect(nf.at.y).toBeGreaterThanOrEqual(150)
    expect(nf.at.y).toBeLessThan(162)
  })

  it('a compact disc measures its diameter; a neck between two discs measures the neck', async () => {
    const disc = await svgToBitmap(svgDoc(200, 200, '<circle cx="100" cy="100" r="40"/>'))
    // a curved outline is pixel-stepped: its nearest paper pixels sit anywhere from 0 to 0.7 px
    // outside the true edge, so within 1.5 px here
    expect(Math.abs(narrowestFeatureMm(disc.bitmap, 200, 200, 10)! - 8)).toBeLessThanOrEqual(0.15)
    const bell = await svgToBitmap(svgDoc(400, 200, '<circle cx="100" cy="100" r="60"/><circle cx="300" cy="100" r="60"/><rect x="100" y="95" width="200" height="10"/>'))
    expect(Math.abs(narrowestFeatureMm(bell.bitmap, 400, 200, 10)! - 1)).toBeLessThanOrEqual(0.1)
    // corners of a wide rectangle are not narrow features
    const block = await svgToBitmap(svgDoc(300, 200, '<rect x="50" y="50" width="200" height="100"/>'))
    expect(Math.abs(narrowestFeatureMm(block.bitmap, 300, 200, 10)! - 10)).toBeLessThanOrEqual(0.1)
    expect(narrowestFeatureMm(new Uint8Array(100), 10, 10, 10)).toBeNull()
  })

  it('the taper of a pointed tip is not a narrow part; a 1.5 mm stroke next to it is', async () => {
    // a 5-pointed star (36° points) and a 15 px stroke
    const star = '<polygon points="200,20 229,110 324,110 247,166 276,256 200,200 124,256 153,166 76,110 171,110"/>'
    const alone = await svgToBitmap(svgDoc(400, 300, star))
    expect(narrowestFeatureMm(alone.bitmap, 400, 300, 10)!).toBeGreaterThan(5)
    const both = await svgToBitmap(svgDoc(400, 300, star + '<rect x="20" y="270" width="360" height="15"/>'))
    expect(Math.abs(narrowestFeatureMm(both.bitmap, 400, 300, 10)! - 1.5)).toBeLessThanOrEqual(0.1)
  })
})
