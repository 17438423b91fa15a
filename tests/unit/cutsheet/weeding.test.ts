// Weeding lines, measured independently: the DXF read back by dxf-parser, distances by
// Shapely (Debian's python3-shapely), not by the Clipper library that made the lines.
import { describe, expect, it } from 'vitest'
import { DXF_CUT_LAYER, DXF_FRAME_LAYER, DXF_LABEL_LAYER, DXF_WEED_LAYER } from '../../../server/cutsheet/dxf'
import { readCleanVector } from '../../../server/cutsheet/path'
import { buildCutSheets, type BatchDesign, type BatchSheetInput } from '../../../server/cutsheet/sheet'
import { weedingLines } from '../../../server/cutsheet/weeding'
import { ezdxfAudit, lines, polylines, readDxf, shapely, texts } from './reference'
import { L_BOX, L_PATH, discPathData, rectPathData, svgMm } from './shapes'

function design(id: string, svg: string, count: number): BatchDesign {
  const v = readCleanVector(svg)
  return { id, curves: v.curves, widthMm: v.widthMm, heightMm: v.heightMm, count }
}

const BADGE = svgMm(80, 70, [discPathData(35, 35, 30) + discPathData(35, 35, 20, true), rectPathData(70, 10, 6, 50)])
const L = svgMm(L_BOX.width, L_BOX.height, [L_PATH])
const DISC = svgMm(25, 25, [discPathData(12.5, 12.5, 12)])

interface Measured { minToCut: number, minToLabel: number, inside: number, count: number, length: number }

/** Shapely: each weeding line's least distance to every cut outline and every label's box. */
function measure(dxf: string): Measured {
  const { entities } = readDxf(dxf)
  const cut = polylines(entities, DXF_CUT_LAYER).map((p) => p.vertices.map((v) => [v.x, v.y]))
  const weed = lines(entities, DXF_WEED_LAYER).map((l) => l.vertices.map((v) => [v.x, v.y]))
  const labelBoxes = texts(entities, DXF_LABEL_LAYER).map((t) => {
    const a = t.startPoint, b = t.endPoint!
    // The text stands on its baseline: up (DXF y) when level, towards +x when turned to read down.
    return a.y === b.y ? [[a.x, a.y], [b.x, b.y], [b.x, b.y + t.textHeight], [a.x, a.y + t.textHeight]] : [[a.x, a.y], [b.x, b.y], [b.x + t.textHeight, b.y], [a.x + t.textHeight, a.y]]
  })
  return shapely<Measured>(`
rings = [LinearRing(r) for r in data["cut"]]
cut = unary_union(rings)
pieces = unary_union([Polygon(r).buffer(0) for r in data["cut"]])
labels = unary_union([Polygon(b) for b in data["labels"]]) if data["labels"] else None
ws = [LineString(l) for l in data["weed"]]
print(json.dumps({
  "minToCut": min(w.distance(cut) for w in ws),
  "minToLabel": min(w.distance(labels) for w in ws) if labels is not None else 1e9,
  "inside": sum(1 for w in ws if w.intersects(pieces)),
  "count": len(ws),
  "length": sum(w.length for w in ws),
}))
`, { cut, weed, labels: labelBoxes })
}

describe('weeding lines', () => {
  const input: BatchSheetInput = {
    designs: [design('J12', BADGE, 3), design('J13', L, 5), design('J14', DISC, 12)],
    sheetWidthMm: 300, sheetHeightMm: 200, gapMm: 4, marginMm: 6, kerfMm: 0.2,
    labels: { mode: 'text' }, weedingLines: { spacingMm: 15, clearanceMm: 1.5 },
  }
  const out = buildCutSheets(input)

  it('stay at least the clearance from every copy and every label, and never cross a piece (Shapely on the DXF read back)', () => {
    for (const sheet of out.sheets) {
      const m = measure(sheet.dxf!)
      expect(m.count).toBeGreaterThan(20)
      expect(m.count).toBe(sheet.weedingLineCount)
      expect(m.minToCut).toBeGreaterThanOrEqual(1.5)
      expect(m.minToLabel).toBeGreaterThanOrEqual(1.5)
      expect(m.inside).toBe(0)
      expect(m.length).toBeCloseTo(sheet.weedingLengthMm, 0)
    }
  })

  it('lie inside the margin, on their own layer and SVG group, and cut before the copies', () => {
    for (const sheet of out.sheets) {
      const ls = lines(readDxf(sheet.dxf!).entities, DXF_WEED_LAYER)
      for (const l of ls) for (const v of l.vertices) {
        expect(v.x).toBeGreaterThanOrEqual(6)
        expect(v.x).toBeLessThanOrEqual(294)
        expect(v.y).toBeGreaterThanOrEqual(6)
        expect(v.y).toBeLessThanOrEqual(194)
      }
      const svg = sheet.svg!
      expect(svg.indexOf(`<g id="dw-sheet-${sheet.sheet}-weeding">`)).toBeGreaterThan(0)
      expect(svg.indexOf(`<g id="dw-sheet-${sheet.sheet}-weeding">`)).toBeLessThan(svg.indexOf(`<g id="dw-sheet-${sheet.sheet}-copies">`))
      expect(ezdxfAudit(sheet.dxf!).errors).toEqual([])
    }
  })

  it('reach into the waste inside a concave design (the L\'s corner, 20 × 30 mm of waste) and keep out of a ring\'s hole', () => {
    // One L at the margin corner (box 5…45 × 5…55 on the SVG sheet): the waste above its foot
    // and right of its bar is x 20…45, y 5…40 in sheet terms (L local x 15…40, y 0…35).
    const one = buildCutSheets({
      designs: [design('L', L, 1), design('B', BADGE, 1)], sheetWidthMm: 200, sheetHeightMm: 100, gapMm: 5, marginMm: 5,
      weedingLines: { spacingMm: 8, clearanceMm: 1 },
    })
    const sheet = one.sheets[0]!
    const l = sheet.copiesOnSheet.find((c) => c.designId === 'L')!
    const b = sheet.copiesOnSheet.find((c) => c.designId === 'B')!
    expect(l.turned || b.turned).toBe(false)
    const { entities } = readDxf(sheet.dxf!)
    const weed = lines(entities, DXF_WEED_LAYER).map((w) => w.vertices.map((v) => [v.x, v.y]))
    const H = 100
    // The L's concave waste, and the badge ring's hole (r 20 about its box's (35, 35)), in DXF terms (y up).
    const corner = [[l.box.x + 15 + 1, H - l.box.y], [l.box.x + 40, H - l.box.y], [l.box.x + 40, H - (l.box.y + 34)], [l.box.x + 15 + 1, H - (l.box.y + 34)]]
    const hole = { x: b.box.x + 35, y: H - (b.box.y + 35) }
    const r = shapely<{ inCorner: number, inHole: number }>(`
ws = unary_union([LineString(w) for w in data["weed"]])
print(json.dumps({"inCorner": ws.intersection(Polygon(data["corner"])).length, "inHole": ws.intersection(Point(data["hole"]["x"], data["hole"]["y"]).buffer(19.5)).length}))
`, { weed, corner, hole })
    expect(r.inCorner).toBeGreaterThan(10)
    expect(r.inHole).toBe(0)
    expect(measure(sheet.dxf!).minToCut).toBeGreaterThanOrEqual(1)
  })

  it('with weeding frames, stay the clearance outside every frame', () => {
    const framed = buildCutSheets({ ...input, labels: { mode: 'ids' }, weedingFrameMm: 1.5, gapMm: 5 })
    for (const sheet of framed.sheets) {
      const { entities } = readDxf(sheet.dxf!)
      const frames = polylines(entities, DXF_FRAME_LAYER).map((p) => p.vertices.map((v) => [v.x, v.y]))
      const weed = lines(entities, DXF_WEED_LAYER).map((w) => w.vertices.map((v) => [v.x, v.y]))
      expect(weed.length).toBeGreaterThan(0)
      const r = shapely<{ min: number }>(`
fr = unary_union([Polygon(f) for f in data["frames"]])
print(json.dumps({"min": min(LineString(w).distance(fr) for w in data["weed"])}))
`, { frames, weed })
      expect(r.min).toBeGreaterThanOrEqual(1.5)
    }
  })

  it('an empty sheet area gets a plain grid, lines no more than the spacing apart (hand-computed)', () => {
    // 100 × 60 sheet, margin 5: usable 5…95 × 5…55. Spacing 20: across 90 / 20 → 5 strips of 18,
    // lines at x = 23, 41, 59, 77; down 50 / 20 → 3 strips of 16.67, lines at y = 21.67, 38.33.
    const ls = weedingLines({ widthMm: 100, heightMm: 60, marginMm: 5 }, [], { spacingMm: 20, clearanceMm: 1 })
    expect(ls.filter((l) => l[0]!.x === l[1]!.x).map((l) => l[0]!.x)).toEqual([23, 41, 59, 77])
    expect(ls.filter((l) => l[0]!.y === l[1]!.y).map((l) => l[0]!.y)).toEqual([21.67, 38.33])
    expect(ls.find((l) => l[0]!.x === 23)).toEqual([{ x: 23, y: 5 }, { x: 23, y: 55 }])
  })

  it('refuses a spacing or clearance that is not a positive number of millimetres', () => {
    expect(() => buildCutSheets({ ...input, weedingLines: { spacingMm: 0, clearanceMm: 1 } })).toThrow(/spacing must be a positive/)
    expect(() => buildCutSheets({ ...input, weedingLines: { spacingMm: 10, clearanceMm: -1 } })).toThrow(/clearance must be a positive/)
  })
})
