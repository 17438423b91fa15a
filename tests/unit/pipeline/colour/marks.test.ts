// Registration marks: the same marks at the same coordinates in every layer's SVG, read back
// with the cut sheet's reader; clear of the design and shaped as stated, measured with Shapely.
import { describe, expect, it } from 'vitest'
import { flattenCurve, readCleanVector, type Point } from '../../../../server/cutsheet/path'
import { measureCurves } from '../../../../server/pipeline/geometry'
import { DEFAULT_MARKS, defaultMarksCut, markCurves, marksCut, markShape, registrationFrame, registrationMarkPositions, withRegistrationMarks } from '../../../../server/pipeline/colour/marks'
import { svgPathProperties } from 'svg-path-properties'
import { layerVector, stackLayers } from '../../../../server/pipeline/colour/stack'
import { discPathData, rectPathData, svgMm } from '../../cutsheet/shapes'
import { shapely } from '../../cutsheet/reference'

const CANVAS = { widthMm: 80, heightMm: 60 }
// Three layers whose ink boxes differ: a bar, a disc, a small square.
const PATHS = [[rectPathData(10, 20, 50, 8)], [discPathData(40, 30, 14)], [rectPathData(36, 26, 8, 8)]]
const layers = () => PATHS.map((p) => readCleanVector(svgMm(CANVAS.widthMm, CANVAS.heightMm, p)))

/** Each layer's SVG with the marks, as the pipeline writes them after stacking. */
function framedSvgs(settings = DEFAULT_MARKS) {
  const stacked = stackLayers(layers(), CANVAS, { mode: 'under', overlapMm: 0.5 })
  const frame = registrationFrame(stacked, CANVAS, settings)
  return { frame, svgs: stacked.map((l) => layerVector(withRegistrationMarks(l.curves, frame), frame).svg) }
}

const boxOf = (pts: Point[]) => ({ x0: Math.min(...pts.map((p) => p.x)), y0: Math.min(...pts.map((p) => p.y)), x1: Math.max(...pts.map((p) => p.x)), y1: Math.max(...pts.map((p) => p.y)) })

describe('registration marks', () => {
  it('sit at identical coordinates (within 0.01 mm) in every layer\'s SVG, read back with readCleanVector', () => {
    const { frame, svgs } = framedSvgs()
    const marksPerLayer = svgs.map((svg) => {
      const v = readCleanVector(svg)
      expect(v.widthMm).toBeCloseTo(frame.widthMm, 6)
      expect(v.heightMm).toBeCloseTo(frame.heightMm, 6)
      // Curves wholly outside the design's box are the marks: the rings and the dots.
      return v.curves.map((c) => boxOf(flattenCurve(c, 0.001)))
        .filter((b) => b.x1 < frame.box.x0 || b.x0 > frame.box.x1 || b.y1 < frame.box.y0 || b.y0 > frame.box.y1)
        .sort((a, b) => a.x0 - b.x0 || a.y0 - b.y0 || (a.x1 - a.x0) - (b.x1 - b.x0))
    })
    for (const marks of marksPerLayer) {
      expect(marks).toHaveLength(6) // three rings, three dots
      marks.forEach((b, i) => {
        const ref = marksPerLayer[0]![i]!
        for (const k of ['x0', 'y0', 'x1', 'y1'] as const) expect(Math.abs(b[k] - ref[k])).toBeLessThanOrEqual(0.01)
      })
    }
    // The dots' centres are the positions the frame gives.
    const dots = marksPerLayer[0]!.filter((b) => b.x1 - b.x0 < DEFAULT_MARKS.sizeMm / 2)
    const positions = registrationMarkPositions(frame)
    for (const p of positions) {
      expect(dots.some((b) => Math.abs((b.x0 + b.x1) / 2 - p.x) <= 0.01 && Math.abs((b.y0 + b.y1) / 2 - p.y) <= 0.01)).toBe(true)
    }
  })

  it('keep every layer\'s drawing at the same place relative to the marks', () => {
    const { frame, svgs } = framedSvgs()
    const drawn = layers()
    svgs.forEach((svg, i) => {
      const inside = readCleanVector(svg).curves.map((c) => boxOf(flattenCurve(c, 0.001)))
        .filter((b) => b.x0 >= frame.box.x0 - 0.6 && b.x1 <= frame.box.x1 + 0.6)
      const want = boxOf(drawn[i]!.curves.flatMap((c) => flattenCurve(c, 0.001)))
      // Layers 0 and 1 grew by the overlap under the layers above; the top one is as drawn.
      const got = inside.find((b) => Math.abs(b.x0 - (want.x0 + frame.shift.x)) <= 0.51)!
      expect(got).toBeDefined()
      if (i === 2) {
        expect(Math.abs(got.x0 - (want.x0 + frame.shift.x))).toBeLessThanOrEqual(0.01)
        expect(Math.abs(got.y0 - (want.y0 + frame.shift.y))).toBeLessThanOrEqual(0.01)
      }
    })
  })

  it('stand outside the design\'s box by the clearance, the rings notched towards the design (Shapely)', () => {
    const { frame } = framedSvgs()
    const rings = frame.marks.map((m) => flattenCurve(markShape(m, DEFAULT_MARKS.sizeMm)[0]!, 0.001).map((p) => [p.x, p.y]))
    const r = shapely<{ distances: number[], notchOpen: boolean[] }>(`
b = box(data["box"]["x0"], data["box"]["y0"], data["box"]["x1"], data["box"]["y1"])
rings = [Polygon(r) for r in data["rings"]]
# The notch: a point on the ring's middle circle towards the design's centre lies outside the ring.
cx, cy = (data["box"]["x0"] + data["box"]["x1"]) / 2, (data["box"]["y0"] + data["box"]["y1"]) / 2
opens = []
for m, ring in zip(data["marks"], rings):
    import math
    d = math.hypot(cx - m["x"], cy - m["y"])
    mid = data["size"] / 2 * (1 - 0.14)
    p = Point(m["x"] + (cx - m["x"]) / d * mid, m["y"] + (cy - m["y"]) / d * mid)
    q = Point(m["x"] - (cx - m["x"]) / d * mid, m["y"] - (cy - m["y"]) / d * mid)
    opens.append((not ring.contains(p)) and ring.contains(q))
print(json.dumps({"distances": [b.distance(r) for r in rings], "notchOpen": opens}))
`, { box: frame.box, rings, marks: frame.marks, size: DEFAULT_MARKS.sizeMm })
    for (const d of r.distances) expect(d).toBeGreaterThanOrEqual(DEFAULT_MARKS.clearanceMm - 0.01)
    expect(r.notchOpen).toEqual([true, true, true])
  })

  it('have the stated shape: ring and dot areas within 0.2 % of Shapely\'s construction', () => {
    const size = 6
    const [ring, dot] = markShape({ x: 0, y: 0, notchAngle: 0.3 }, size)
    const ours = { ring: measureCurves([ring!], 1).inkAreaMm2, dot: measureCurves([dot!], 1).inkAreaMm2 }
    const theirs = shapely<{ ring: number, dot: number }>(`
from shapely import affinity
R, size = data["size"] / 2, data["size"]
r = R - 0.14 * size
notch = affinity.rotate(box(0, -0.09 * size, R + 1, 0.09 * size), data["angle"], origin=(0, 0), use_radians=True)
ring = Point(0, 0).buffer(R, 512).difference(Point(0, 0).buffer(r, 512)).difference(notch)
print(json.dumps({"ring": ring.area, "dot": Point(0, 0).buffer(0.11 * size, 512).area}))
`, { size, angle: 0.3 })
    expect(Math.abs(ours.ring / theirs.ring - 1)).toBeLessThan(0.002)
    expect(Math.abs(ours.dot / theirs.dot - 1)).toBeLessThan(0.002)
    // A dot big enough to survive weeding (1 mm², the pipeline's default small-piece limit).
    expect(ours.dot).toBeGreaterThan(1)
  })

  it('can be turned off: no marks, the canvas and the drawing as they were', () => {
    const off = framedSvgs({ ...DEFAULT_MARKS, enabled: false })
    expect(off.frame.marks).toEqual([])
    expect(registrationMarkPositions(off.frame)).toEqual([])
    expect(off.frame.shift).toEqual({ x: 0, y: 0 })
    const plain = stackLayers(layers(), CANVAS, { mode: 'under', overlapMm: 0.5 }).map((l) => l.svg)
    expect(off.svgs).toEqual(plain)
  })

  it('refuse sizes out of range', () => {
    expect(() => registrationFrame(layers(), CANVAS, { enabled: true, clearanceMm: 0, sizeMm: 6 })).toThrow(RangeError)
    expect(() => registrationFrame(layers(), CANVAS, { enabled: true, clearanceMm: 4, sizeMm: 100 })).toThrow(RangeError)
  })

  it('add their cut to every layer: the length svg-path-properties measures on their path, six outlines', () => {
    const { frame } = framedSvgs()
    const curves = markCurves(frame)
    // The marks' path as SVG path data, measured by svg-path-properties (npm), a general-purpose path-length library.
    const f = (p: Point) => `${p.x} ${p.y}`
    const d = curves.map((c) => `M${f(c.segments[0]!.from)}${c.segments.map((s) => (s.kind === 'line' ? `L${f(s.to)}` : `C${f(s.c1)} ${f(s.c2)} ${f(s.to)}`)).join('')}Z`).join('')
    const measured = new svgPathProperties(d).getTotalLength()
    const cut = marksCut(frame)
    expect(Math.abs(cut.cutLengthMm - measured)).toBeLessThanOrEqual(0.001 * measured)
    expect(cut.outlines).toBe(6)
    // A layer stored before its marks were measured gets the default marks' figures: the same.
    expect(defaultMarksCut(frame.marks.length)).toEqual(cut)
    expect(marksCut(framedSvgs({ ...DEFAULT_MARKS, enabled: false }).frame)).toEqual({ cutLengthMm: 0, outlines: 0 })
  })
})
