import { svgPathProperties } from 'svg-path-properties'
import { beforeAll, describe, expect, it } from 'vitest'
import {
  curveLength, curveSignedArea, distanceTransform, measureCurves, narrowestFeature, narrowestFeatureMm,
  segmentLength, segmentSignedArea, smallPieces, squaredDistanceTransform,
} from '../../../server/pipeline/geometry'
import { prepareBitmap } from '../../../server/pipeline/prepare'
import { fillPinholes, strokeSkeleton } from '../../../server/pipeline/skeleton'
import { traceBitmap, type ClosedCurve, type Segment } from '../../../server/pipeline/trace'
import { mulberry32, referenceNarrowest, svgDoc, svgToBitmap, svgToPng, type ReferenceNarrowest } from './helpers'

/**
 * Connected groups of pixels of one value (1 ink, 0 paper), 4- or 8-connected, by flood fill,
 * with the image inside a one-pixel paper border (outside the image is paper).
 */
function components(inner: Uint8Array, iw: number, ih: number, value: number, connectivity: 4 | 8): number {
  const w = iw + 2, h = ih + 2
  const bm = new Uint8Array(w * h)
  for (let y = 0; y < ih; y++) bm.set(inner.subarray(y * iw, (y + 1) * iw), (y + 1) * w + 1)
  const seen = new Uint8Array(w * h)
  const steps = connectivity === 4 ? [[1, 0], [-1, 0], [0, 1], [0, -1]] : [[1, 0], [-1, 0], [0, 1], [0, -1], [1, 1], [1, -1], [-1, 1], [-1, -1]]
  let n = 0
  for (let i = 0; i < w * h; i++) {
    if (seen[i] || bm[i] !== value) continue
    n++
    seen[i] = 1
    const stack = [i]
    while (stack.length) {
      const j = stack.pop()!
      const x = j % w, y = (j - x) / w
      for (const [dx, dy] of steps) {
        const xx = x + dx!, yy = y + dy!
        if (xx < 0 || yy < 0 || xx >= w || yy >= h) continue
        const k = yy * w + xx
        if (!seen[k] && bm[k] === value) { seen[k] = 1; stack.push(k) }
      }
    }
  }
  return n
}

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

  it('the squared distance transform is exact on sparse, dense and solid bitmaps (against brute force)', () => {
    // Same source and check as above, on more kinds of ink: specks, noise, and one solid block
    // whose distances are larger than a row's runs.
    const rnd = mulberry32(12)
    const cases: Array<[number, number, (x: number, y: number) => boolean]> = [
      [41, 29, () => rnd() < 0.1],
      [29, 41, () => rnd() < 0.5],
      [40, 40, (x, y) => (x > 3 && x < 36 && y > 5 && y < 38) || rnd() < 0.05],
      [17, 60, () => rnd() < 0.97],
    ]
    for (const [w, h, ink] of cases) {
      const bm = new Uint8Array(w * h)
      for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) bm[y * w + x] = ink(x, y) ? 1 : 0
      const d2 = squaredDistanceTransform(bm, w, h)
      for (let y = 0; y < h; y++) {
        for (let x = 0; x < w; x++) {
          let best = bm[y * w + x] ? Infinity : 0
          for (let yy = -1; yy <= h && best; yy++) {
            for (let xx = -1; xx <= w; xx++) {
              if (xx < 0 || yy < 0 || xx >= w || yy >= h || !bm[yy * w + xx]) best = Math.min(best, (xx - x) ** 2 + (yy - y) ** 2)
            }
          }
          expect(d2[y * w + x]).toBe(best)
        }
      }
    }
  })

  it('the skeleton lies in the ink and keeps its pieces and holes', () => {
    // The thinning must not break a piece, join two, or open or close a hole: counted here by
    // flood fill (ink 8-connected, paper 4-connected) on blobby random ink.
    const rnd = mulberry32(13)
    const w = 90, h = 70
    const bm = new Uint8Array(w * h)
    for (let k = 0; k < 40; k++) {
      const cx = rnd() * w, cy = rnd() * h, r = 2 + rnd() * 9, hole = rnd() < 0.3
      for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) {
        const d = Math.hypot(x - cx, y - cy)
        if (d < r && !(hole && d < r / 2.5)) bm[y * w + x] = 1
      }
    }
    const sk = strokeSkeleton(bm, w, h)
    const skel = new Uint8Array(w * h)
    for (const i of sk.pixels) { expect(fillPinholes(bm, w, h)[i]).toBe(1); skel[i] = 1 }
    const filled = fillPinholes(bm, w, h)
    expect(components(skel, w, h, 1, 8)).toBe(components(filled, w, h, 1, 8))
    expect(components(skel, w, h, 0, 4)).toBe(components(filled, w, h, 0, 4))
    expect(sk.pieces).toBe(components(filled, w, h, 1, 8))
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

  describe('at any angle, against a skeleton and distance transform from a general image library', () => {
    // Reference: scikit-image's skimage.morphology.medial_axis and SciPy's
    // scipy.ndimage.distance_transform_edt (Debian python3-skimage), with the same end-taper
    // rule and widths written again on top of them (reference/narrowest.py). Each shape is
    // turned from 0° to 45° in 3° steps about the middle of a 400 × 400 px image.
    const shapes: Array<{ name: string, body: string, drawn: number | null, within?: number }> = [
      // a bar 40 px tall with V notches from both sides leaving a neck 16 px wide: a sharp neck
      // is read at the nearest skeleton pixel, up to a pixel off its narrowest point
      { name: 'a bar with a sharp neck', body: '<path d="M50 180 H350 V220 H50 Z M185 180 L200 192 L215 180 Z M185 220 L200 208 L215 220 Z" fill-rule="evenodd"/>', drawn: 16, within: 2 },
      { name: 'a bar with a round neck', body: '<path d="M50 180 H350 V220 H50 Z"/><circle cx="200" cy="162" r="30" fill="#fff"/><circle cx="200" cy="238" r="30" fill="#fff"/>', drawn: 16 },
      { name: 'a Y of 14 px strokes', body: '<path d="M200 200 L200 330 M200 200 L90 120 M200 200 L310 120" stroke="#000" stroke-width="14" fill="none"/>', drawn: 14 },
      // a body, a leg tapering from 60 to 24 px, a 12 px ankle, a foot
      { name: 'a leg with a narrow ankle', body: '<ellipse cx="200" cy="110" rx="90" ry="50"/><path d="M170 140 L230 140 L212 250 L188 250 Z"/><rect x="194" y="249" width="12" height="16"/><ellipse cx="212" cy="272" rx="30" ry="12"/>', drawn: 12 },
      { name: 'the letter K', body: '<text x="90" y="290" font-family="DejaVu Sans" font-weight="bold" font-size="230">K</text>', drawn: null },
      { name: 'the letter A', body: '<text x="110" y="290" font-family="DejaVu Sans" font-size="230">A</text>', drawn: null },
      { name: 'the letter y', body: '<text x="120" y="250" font-family="DejaVu Serif" font-size="230">y</text>', drawn: null },
    ]
    const angles = Array.from({ length: 16 }, (_, k) => 3 * k)
    const drawn: Array<Array<{ bitmap: Uint8Array, width: number, height: number }>> = []
    let reference: ReferenceNarrowest[][] = []
    beforeAll(async () => {
      for (const shape of shapes) {
        const row = []
        for (const angle of angles) row.push(await svgToBitmap(svgDoc(400, 400, `<g transform="rotate(${angle} 200 200)">${shape.body}</g>`)))
        drawn.push(row)
      }
      // one run of the reference for every shape and angle
      const all = referenceNarrowest(drawn.flat())
      reference = drawn.map((_, i) => all.slice(i * angles.length, (i + 1) * angles.length))
    }, 120_000)
    shapes.forEach((shape, i) => {
      it(shape.name, () => {
        drawn[i]!.forEach((b, k) => {
          const ours = narrowestFeature(b.bitmap, b.width, b.height, 10)!
          // the two skeletons differ in detail; their narrowest widths within a pixel
          expect(Math.abs(ours.widthPx - reference[i]![k]!.widthPx!), `${angles[k]}°`).toBeLessThanOrEqual(1)
          if (shape.drawn !== null) expect(Math.abs(ours.widthPx - shape.drawn), `${angles[k]}°`).toBeLessThanOrEqual(shape.within ?? 1.5)
        })
      })
    })
  })
})
