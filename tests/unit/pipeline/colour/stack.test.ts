// Stack order and overlap, measured on the polygons with Shapely (Debian's python3-shapely),
// the original outlines sampled from their path data by svg-path-properties (npm): neither
// shares code with the stacking.
import { svgPathProperties } from 'svg-path-properties'
import { describe, expect, it } from 'vitest'
import { flattenCurve, readCleanVector } from '../../../../server/cutsheet/path'
import { measureCurves } from '../../../../server/pipeline/geometry'
import { stackLayers, type StackSettings } from '../../../../server/pipeline/colour/stack'
import { discPathData, rectPathData, svgMm } from '../../cutsheet/shapes'
import { shapely } from '../../cutsheet/reference'

type Ring = Array<[number, number]>
const CANVAS = { widthMm: 80, heightMm: 60 }
const TOLERANCE = 0.02

// Bottom: a pale background card. Middle: a ring (outer r 20, hole r 8) about (30, 30).
// Top: a disc r 10 over the ring's hole and a bar abutting the ring's right edge at (50, 30).
const PATHS = [
  [rectPathData(2, 2, 76, 56)],
  [discPathData(30, 30, 20) + discPathData(30, 30, 8, true)],
  [discPathData(30, 30, 10), rectPathData(50, 25, 20, 10)],
]

/** Rings sampled every 0.05 mm along each subpath of the path data (svg-path-properties). */
function sampleRings(paths: string[]): Ring[] {
  const rings: Ring[] = []
  for (const d of paths) {
    for (const sub of d.split(/(?=M)/)) {
      const props = new svgPathProperties(sub)
      const len = props.getTotalLength()
      const n = Math.max(8, Math.ceil(len / 0.05))
      const ring: Ring = []
      for (let i = 0; i < n; i++) { const p = props.getPointAtLength((i * len) / n); ring.push([p.x, p.y]) }
      rings.push(ring)
    }
  }
  return rings
}

/** A stacked layer's polygons read back from its SVG (straight segments: exact vertices). */
function readRings(svg: string): Ring[] {
  return readCleanVector(svg).curves.map((c) => flattenCurve(c, 0.001).map((p) => [p.x, p.y] as [number, number]))
}

const REGION = `
def region(rings):
    g = Polygon()
    for r in rings:
        if len(r) >= 3:
            g = g.symmetric_difference(Polygon(r).buffer(0))
    return g
`

interface UnderCheck { missing: number, missingIfUngrown: number, beyondGrowth: number, beyondUpper: number }

function checkUnder(orig: Ring[], upper: Ring[], got: Ring[], d: number): UnderCheck {
  return shapely<UnderCheck>(`${REGION}
orig, got, d, t = region(data["orig"]), region(data["got"]), data["d"], data["t"]
upper = region(data["upper"])
must = orig.buffer(d - t, 64).intersection(upper.buffer(-t, 64)).union(orig.buffer(-t, 64))
print(json.dumps({
  "missing": must.difference(got).area,
  "missingIfUngrown": must.difference(orig).area,
  "beyondGrowth": got.difference(orig.buffer(d + t, 64)).area,
  "beyondUpper": got.difference(orig.union(upper).buffer(t, 64)).area,
}))
`, { orig, upper, got, d, t: TOLERANCE })
}

function stack(settings: StackSettings) {
  const layers = PATHS.map((p) => readCleanVector(svgMm(CANVAS.widthMm, CANVAS.heightMm, p)))
  return stackLayers(layers, CANVAS, settings)
}

describe('overlap: a lower layer runs on under the layers above', () => {
  it.each([0.3, 0.5, 1.2])('the ring grown by %s mm under the disc and the bar contains the original grown by the overlap within 0.02 mm (Shapely)', (d) => {
    const out = stack({ mode: 'under', overlapMm: d })
    // The top layer is as drawn; the upper region for the ring is the top layer.
    expect(out[2]!.reshaped).toBe(false)
    expect(out[1]!.reshaped).toBe(true)
    const c = checkUnder(sampleRings(PATHS[1]!), sampleRings(PATHS[2]!), readRings(out[1]!.svg), d)
    expect(c.missing).toBeLessThan(1e-6)
    expect(c.beyondGrowth).toBeLessThan(1e-6)
    expect(c.beyondUpper).toBeLessThan(1e-6)
    // The check has teeth: the ring as drawn misses the growth under the disc (its hole shrinks
    // from r 8 towards r 8 − d) and under the bar.
    expect(c.missingIfUngrown).toBeGreaterThan(2 * Math.PI * 7.5 * (d - TOLERANCE) * 0.9)
  })

  it('grows the ring by the annulus 8 − d … 8 inside its hole and the lens where its edge meets the bar (handbook geometry)', () => {
    const d = 0.5
    const grown = measureCurves(stack({ mode: 'under', overlapMm: d })[1]!.curves, 1).inkAreaMm2
    const drawn = measureCurves(stack({ mode: 'under', overlapMm: 0 })[1]!.curves, 1).inkAreaMm2
    const annulus = Math.PI * (8 ** 2 - (8 - d) ** 2)
    // The ring grown to r 20 + d reaches past the bar's edge x = 50 (20 from the centre): a
    // circular segment r² acos(h / r) − h √(r² − h²) with h = 20 (the bar is taller than its chord).
    const r = 20 + d, h = 20
    const lens = r * r * Math.acos(h / r) - h * Math.sqrt(r * r - h * h)
    expect(Math.abs(grown - drawn - (annulus + lens))).toBeLessThan(0.1)
  })

  it('leaves every layer as drawn with no overlap', () => {
    const out = stack({ mode: 'under', overlapMm: 0 })
    expect(out.every((l) => !l.reshaped)).toBe(true)
    const drawn = readCleanVector(svgMm(CANVAS.widthMm, CANVAS.heightMm, PATHS[1]!))
    expect(readCleanVector(out[1]!.svg).curves.length).toBe(drawn.curves.length)
  })
})

describe('knock-out: a lower layer cut away under the layers above', () => {
  it.each([0, 0.5])('with a %s mm strip kept under the upper edge (Shapely)', (d) => {
    const out = stack({ mode: 'knock-out', overlapMm: d })
    const c = shapely<{ underUpper: number, missingVisible: number, missingStrip: number }>(`${REGION}
orig, upper, got, d, t = region(data["orig"]), region(data["upper"]), region(data["got"]), data["d"], data["t"]
visible = orig.buffer(-t, 64).difference(upper.buffer(t, 64))
strip = orig.buffer(d - t, 64).intersection(upper.buffer(-t, 64)).difference(upper.buffer(-(d - t), 64)) if d > 0 else Polygon()
print(json.dumps({
  "underUpper": got.intersection(upper.buffer(-(d + t), 64)).area,
  "missingVisible": visible.difference(got).area,
  "missingStrip": strip.difference(got).area,
}))
`, { orig: sampleRings(PATHS[1]!), upper: sampleRings(PATHS[2]!), got: readRings(out[1]!.svg), d, t: TOLERANCE })
    expect(c.underUpper).toBeLessThan(1e-6)
    expect(c.missingVisible).toBeLessThan(1e-6)
    expect(c.missingStrip).toBeLessThan(1e-6)
  })

  it('cuts the background card where the ring and the top layer sit', () => {
    const out = stack({ mode: 'knock-out', overlapMm: 0 })
    const card = measureCurves(out[0]!.curves, 1).inkAreaMm2
    // Card 76 × 56 less the ring's disc r 20 (its hole is covered by the top disc) and the bar.
    expect(card).toBeCloseTo(76 * 56 - Math.PI * 400 - 20 * 10, -0.5)
  })
})

describe('the layers\' files', () => {
  it('are clean vectors in mm on the 0.01 mm grid, the same bytes every time', () => {
    const a = stack({ mode: 'under', overlapMm: 0.5 })
    const b = stack({ mode: 'under', overlapMm: 0.5 })
    expect(a.map((l) => l.svg)).toEqual(b.map((l) => l.svg))
    for (const l of a) {
      expect(l.svg).toMatch(/^<svg xmlns="http:\/\/www.w3.org\/2000\/svg" width="80mm" height="60mm" viewBox="0 0 80 60"/)
      expect(l.svg).toContain('fill-rule="evenodd"')
      for (const c of l.curves) for (const s of c.segments) for (const v of [s.from.x, s.from.y, s.to.x, s.to.y]) expect(Math.abs(v * 100 - Math.round(v * 100))).toBeLessThan(1e-6)
    }
  })

  it('refuse an overlap out of range and an unknown mode', () => {
    expect(() => stack({ mode: 'under', overlapMm: -1 })).toThrow(RangeError)
    expect(() => stack({ mode: 'under', overlapMm: 9 })).toThrow(RangeError)
    expect(() => stack({ mode: 'sideways' as 'under', overlapMm: 1 })).toThrow(RangeError)
  })
})

describe('seams between touching layers', () => {
  // Two inks outlined one at a time leave a seam: here a 0.1 mm gap between a lower and an upper bar.
  const paths = [[rectPathData(5, 5, 20, 10)], [rectPathData(25.1, 5, 20, 10)]]
  const canvas = { widthMm: 50, heightMm: 20 }
  const read = () => paths.map((p) => readCleanVector(svgMm(canvas.widthMm, canvas.heightMm, p)))

  it('are filled by the lower layer given their width, and not otherwise (Shapely)', () => {
    const d = 0.5
    for (const seam of [0, 0.2]) {
      const out = stackLayers(read(), canvas, { mode: 'under', overlapMm: d }, { seamMm: seam })
      const r = shapely<{ gapLeft: number, beyond: number }>(`${REGION}
got, upper, orig = region(data["got"]), region(data["upper"]), region(data["orig"])
gap = box(25, 5.05, 25.1, 14.95)
print(json.dumps({"gapLeft": gap.difference(got).area, "beyond": got.difference(orig.union(upper).buffer(data["seam"] + 0.02, 64)).area}))
`, { got: readRings(out[0]!.svg), upper: sampleRings(paths[1]!), orig: sampleRings(paths[0]!), seam })
      if (seam === 0) expect(r.gapLeft).toBeGreaterThan(0.5) // the 0.1 × 9.9 mm seam stays paper
      else expect(r.gapLeft).toBeLessThan(1e-6)
      expect(r.beyond).toBeLessThan(1e-6)
    }
  })
})
