// Kerf compensation, checked on the DXF as an outside reader (dxf-parser) sees it, against
// handbook geometry and against Shapely's buffer (an independent polygon offset).
import { describe, expect, it } from 'vitest'
import { KERF_ARC_TOLERANCE_MM, prepareDesign } from '../../../server/cutsheet/design'
import { DXF_CUT_LAYER } from '../../../server/cutsheet/dxf'
import { readCleanVector } from '../../../server/cutsheet/path'
import { buildCutSheets, type BatchSheetInput } from '../../../server/cutsheet/sheet'
import { parsePathData } from '../../../server/pipeline/svgpath'
import { bbox, polylines, readDxf, shapely } from './reference'
import { discPathData, rectPathData, svgMm } from './shapes'

function oneCopy(svg: string, kerfMm: number, extra: Partial<BatchSheetInput> = {}) {
  const v = readCleanVector(svg)
  return buildCutSheets({
    designs: [{ id: 'T', curves: v.curves, widthMm: v.widthMm, heightMm: v.heightMm, count: 1 }],
    sheetWidthMm: 100, sheetHeightMm: 100, gapMm: 3, marginMm: 5, kerfMm, ...extra,
  })
}

/** The cut outlines read back from the DXF, largest first, in DXF coordinates (y up). */
function cutOutlines(dxf: string) {
  const cut = polylines(readDxf(dxf).entities, DXF_CUT_LAYER)
  for (const p of cut) expect(p.shape).toBe(true) // closed (group 70 bit 1)
  return cut.map((p) => p.vertices).sort((a, b) => (bbox(b).x1 - bbox(b).x0) - (bbox(a).x1 - bbox(a).x0))
}

const SQUARE_WITH_HOLE = svgMm(30, 30, [rectPathData(5, 5, 20, 20) + rectPathData(10, 10, 10, 10)])

describe('kerf compensation', () => {
  it('a 20 mm square with a 10 mm square hole, kerf 0.2 mm: the cut path measures 20.2 mm and 9.8 mm (read back by dxf-parser)', () => {
    // Half the kerf each side: 20 + 2 × 0.1 = 20.2 outside, 10 − 2 × 0.1 = 9.8 for the hole, so
    // after the beam takes its 0.2 mm the piece is 20.0 and the hole 10.0 (issue 12).
    const [sheet] = oneCopy(SQUARE_WITH_HOLE, 0.2).sheets
    const [outer, hole] = cutOutlines(sheet!.dxf!)
    const o = bbox(outer!), h = bbox(hole!)
    expect(o.x1 - o.x0).toBeCloseTo(20.2, 6)
    expect(o.y1 - o.y0).toBeCloseTo(20.2, 6)
    expect(h.x1 - h.x0).toBeCloseTo(9.8, 6)
    expect(h.y1 - h.y0).toBeCloseTo(9.8, 6)
    // The hole's corners stay square (its offset moves inwards); the outside's corners are
    // quarter circles of radius 0.1 mm about the drawn corners (the beam spot's path), so a
    // vertex near a corner lies 0.1 mm from the drawn corner within the arc tolerance.
    expect(hole).toHaveLength(4)
    const corner = { x: o.x0 + 0.1, y: o.y0 + 0.1 } // the drawn square's corner, DXF coordinates
    const near = outer!.filter((p) => p.x < corner.x && p.y < corner.y)
    expect(near.length).toBeGreaterThan(0)
    for (const p of near) expect(Math.abs(Math.hypot(p.x - corner.x, p.y - corner.y) - 0.1)).toBeLessThanOrEqual(KERF_ARC_TOLERANCE_MM + 0.0075)
  })

  it('a 10 mm round hole in a 20 mm disc, kerf 0.2 mm: 9.8 mm and 20.2 mm across (handbook circle, within flattening and arc tolerance)', () => {
    const svg = svgMm(30, 30, [discPathData(15, 15, 10) + discPathData(15, 15, 5, true)])
    const [outer, hole] = cutOutlines(oneCopy(svg, 0.2).sheets[0]!.dxf!)
    const o = bbox(outer!), h = bbox(hole!)
    // Flattened chords sit at most 0.05 mm inside the circle; the 0.01 mm grid adds ≤ 0.005.
    expect(Math.abs(o.x1 - o.x0 - 20.2)).toBeLessThanOrEqual(0.02)
    expect(Math.abs(h.x1 - h.x0 - 9.8)).toBeLessThanOrEqual(0.02)
    expect(Math.abs(h.y1 - h.y0 - 9.8)).toBeLessThanOrEqual(0.02)
  })

  it('matches Shapely\'s buffer of the drawn outline by half the kerf, round joins (independent offset, Hausdorff ≤ 0.02 mm)', () => {
    // A ring with a notch and a bar: convex and concave corners, a hole, curves.
    const svg = svgMm(80, 70, [
      discPathData(35, 35, 30) + discPathData(35, 35, 20, true),
      'M68 10H76V60H72V30H68Z',
    ])
    // With a kerf the copy's box grows by 0.15 mm on every side and its corner stays at the
    // margin, so the drawing sits 0.15 mm further right and (DXF y up) 0.15 mm lower.
    const drawn = cutOutlines(oneCopy(svg, 0).sheets[0]!.dxf!).map((p) => p.map((q) => ({ x: q.x + 0.15, y: q.y - 0.15 })))
    const cut = cutOutlines(oneCopy(svg, 0.3).sheets[0]!.dxf!)
    const r = shapely<{ hausdorff: number, areaDrawn: number, areaCut: number, areaBuffer: number }>(`
def region(rings):
    # SVG's even-odd fill: a point is inside when inside an odd number of rings.
    g = Polygon(rings[0]).buffer(0)
    for r in rings[1:]:
        g = g.symmetric_difference(Polygon(r).buffer(0))
    return g
drawn = region(data["drawn"])
cut = region(data["cut"])
buf = drawn.buffer(0.15, 64, join_style=1)  # Shapely 1.8: 64 segments a quarter circle, 1 = round joins
print(json.dumps({"hausdorff": cut.boundary.hausdorff_distance(buf.boundary), "areaDrawn": drawn.area, "areaCut": cut.area, "areaBuffer": buf.area}))
`, { drawn: drawn.map((p) => p.map((q) => [q.x, q.y])), cut: cut.map((p) => p.map((q) => [q.x, q.y])) })
    // Both offsets of the same flattened outline; ours rounds to 0.01 mm and chords arcs within 0.005 mm.
    expect(r.hausdorff).toBeLessThanOrEqual(0.02)
    expect(r.areaCut).toBeGreaterThan(r.areaDrawn)
    expect(Math.abs(r.areaCut / r.areaBuffer - 1)).toBeLessThan(1e-3)
  })

  it('kerf 0 turns it off: the drawn curves exactly, in the SVG and the DXF', () => {
    const v = readCleanVector(SQUARE_WITH_HOLE)
    const off = oneCopy(SQUARE_WITH_HOLE, 0).sheets[0]!
    expect(oneCopy(SQUARE_WITH_HOLE, 0, { kerfMm: undefined }).sheets[0]!.svg).toBe(off.svg)
    const def = /<path id="dw-design-T" d="([^"]+)"\/>/.exec(off.svg!)![1]!
    // Same closed curves, vertex for vertex (only the cut order may differ: smaller first).
    const key = (d: string) => parsePathData(d).map((sp) => sp.segments.map((s) => `${s.from.x},${s.from.y}`).join(' ')).sort()
    expect(key(def)).toEqual(key(/ d="([^"]+)"/.exec(SQUARE_WITH_HOLE)![1]!))
    expect(v.curves).toHaveLength(2)
    const [outer, hole] = cutOutlines(off.dxf!)
    expect(bbox(outer!).x1 - bbox(outer!).x0).toBe(20)
    expect(bbox(hole!).x1 - bbox(hole!).x0).toBe(10)
  })

  it('cuts holes before the outline around them (smaller outlines first)', () => {
    const d = prepareDesign({ id: 'T', ...readCleanVector(SQUARE_WITH_HOLE) }, 0.2)
    expect(d.polygons).toHaveLength(2)
    // The first polygon cut is the hole: all its vertices inside 10…20.
    const first = d.polygonsMm[0]!
    expect(first.every((p) => p.x > 9 && p.x < 21)).toBe(true)
    // The box grows by half the kerf on every side.
    expect(d.box).toEqual({ x0: -0.1, y0: -0.1, x1: 30.1, y1: 30.1 })
  })

  it('an outline reaching past its drawn box widens the box, so gaps still hold (hand-computed, DXF read back)', () => {
    // A 22 × 20 mm bar drawn in a 20 × 20 mm box, 1 mm over each side: the box is −1 … 21,
    // and 0.05 mm more where the outline leaves the drawn box (without kerf the SVG keeps the
    // curves, which may bulge up to the 0.05 mm chord tolerance past their flattened points).
    const svg = svgMm(20, 20, [rectPathData(-1, 0, 22, 20)])
    expect(prepareDesign({ id: 'W', ...readCleanVector(svg) }, 0).box).toEqual({ x0: -1.05, y0: 0, x1: 21.05, y1: 20 })
    const v = readCleanVector(svg)
    const out = buildCutSheets({ designs: [{ id: 'W', ...v, count: 2 }], sheetWidthMm: 100, sheetHeightMm: 40, gapMm: 3, marginMm: 5, allowTurn: false })
    const xs = polylines(readDxf(out.sheets[0]!.dxf!).entities, DXF_CUT_LAYER).map((p) => bbox(p.vertices)).sort((a, b) => a.x0 - b.x0)
    // Boxes 22.1 mm wide from the 5 mm margin, 3 mm apart: 5 … 27.1 and 30.1 … 52.2; the bars
    // sit 0.05 mm inside them: 5.05 … 27.05 and 30.15 … 52.15, 3.1 mm apart.
    expect(xs.map((b) => [b.x0, b.x1])).toEqual([[5.05, 27.05], [30.15, 52.15]])
    // Film usage counts the drawn size: 2 × 20 × 20 / (100 × 40) = 20 %.
    expect(out.sheets[0]!.usagePercent).toBeCloseTo(20, 9)
  })

  it('refuses a kerf that is negative, not a number or over 2 mm', () => {
    for (const k of [-0.1, Number.NaN, 2.5]) expect(() => oneCopy(SQUARE_WITH_HOLE, k)).toThrow(/kerf must be between 0 and 2 mm/)
  })
})
