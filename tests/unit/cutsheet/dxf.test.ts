import DxfParser from 'dxf-parser'
import { svgPathProperties } from 'svg-path-properties'
import { describe, expect, it } from 'vitest'
import { DXF_CUT_LAYER, DXF_FRAME_LAYER, cutSheetDxf } from '../../../server/cutsheet/dxf'
import { readCleanVector } from '../../../server/cutsheet/path'
import { cutSheetSvg } from '../../../server/cutsheet/svg'
import { layoutSheets } from '../../../shared/utils/sheet-layout'
import { L_BOX, L_PATH, closedLength, discPathData, groupsOf, rectPathData, svgMm } from './shapes'

interface Vertex { x: number, y: number }
interface Polyline { type: string, layer: string, shape: boolean, vertices: Vertex[] }

/** Read back with dxf-parser, a general-purpose DXF reader from npm. */
function parse(dxf: string) {
  const doc = new DxfParser().parseSync(dxf) as unknown as { header: Record<string, unknown>, entities: Polyline[] }
  expect(doc).toBeTruthy()
  return doc
}

// A badge made in code: a ring R = 30 / r = 20 at (35, 35) and a 6 × 50 bar beside it, in an
// 80 × 70 box.
const BADGE = { width: 80, height: 70 }
const badge = svgMm(BADGE.width, BADGE.height, [
  discPathData(35, 35, 30) + discPathData(35, 35, 20, true),
  rectPathData(70, 10, 6, 50),
])
const badgeCurves = readCleanVector(badge).curves

function badgeInput(copies: number, extra: Record<string, unknown> = {}) {
  // 80 × 70 on 300 × 200, gap 6, margin 8: as drawn across (300 − 16 + 6) / 86 = 3.37 → 3,
  // down (200 − 16 + 6) / 76 = 2.5 → 2 → 6; turned 70 × 80: across 290 / 76 = 3.8 → 3,
  // down 190 / 86 = 2.2 → 2 → 6. Tie → as drawn, 6 per sheet.
  const layout = layoutSheets({ copyWidthMm: 80, copyHeightMm: 70, copies, sheetWidthMm: 300, sheetHeightMm: 200, gapMm: 6, marginMm: 8 })
  return { curves: badgeCurves, copyWidthMm: 80, copyHeightMm: 70, layout, sheetWidthMm: 300, sheetHeightMm: 200, mirror: false, weedingFrameMm: null as number | null, ...extra }
}

describe('cutSheetDxf read back by dxf-parser', () => {
  it('header: R12 drawing version and millimetres', () => {
    const [dxf] = cutSheetDxf(badgeInput(1))
    const { header } = parse(dxf!)
    // AutoCAD DXF reference, HEADER section: $ACADVER AC1009 = R11 and R12.
    expect(header.$ACADVER).toBe('AC1009')
    // INSUNITS system variable: 4 = Millimeters (AutoCAD documentation).
    expect(header.$INSUNITS).toBe(4)
    expect(header.$EXTMAX).toMatchObject({ x: 300, y: 200 })
  })

  it('one closed POLYLINE per closed curve and per weeding frame, on our layers', () => {
    expect(badgeCurves).toHaveLength(3) // ring outside, ring hole, bar
    const input = badgeInput(8, { weedingFrameMm: 2 })
    const dxfs = cutSheetDxf(input)
    // 6 per sheet → 8 copies on 2 sheets: 6 and 2.
    expect(dxfs).toHaveLength(2)
    const counts = [6, 2]
    dxfs.forEach((dxf, i) => {
      const { entities } = parse(dxf)
      // DXF R12 reference: POLYLINE … VERTEX … SEQEND; dxf-parser returns each as one entity.
      expect(entities).toHaveLength(counts[i]! * (3 + 1))
      for (const e of entities) {
        expect(e.type).toBe('POLYLINE')
        // POLYLINE group 70, bit 1 = closed polyline (DXF reference).
        expect(e.shape).toBe(true)
        expect(e.vertices.length).toBeGreaterThanOrEqual(4)
      }
      expect(entities.filter((e) => e.layer === DXF_CUT_LAYER)).toHaveLength(counts[i]! * 3)
      expect(entities.filter((e) => e.layer === DXF_FRAME_LAYER)).toHaveLength(counts[i]!)
    })
  })

  it('total length within 0.1 % of the SVG cut length (svg-path-properties on each path, × copies)', () => {
    const input = badgeInput(5, { weedingFrameMm: 2, mirror: true })
    const [svg] = cutSheetSvg(input)
    const [dxf] = cutSheetDxf(input)
    // SVG side: svg-path-properties (npm) on every path's d. Copies are placed by rigid
    // transforms (translation, ±90° turn, mirror), which keep lengths, so each copy group's
    // length is its local path length; the frames are in sheet coordinates.
    let svgCut = 0, svgFrames = 0
    for (const g of groupsOf(svg!)) {
      const l = g.paths.reduce((s, d) => s + new svgPathProperties(d).getTotalLength(), 0)
      if (g.id.startsWith('dw-copy-')) svgCut += l
      else svgFrames += l
    }
    // The copy's own cut length × copies, computed a second way from the source document.
    const one = [...badge.matchAll(/ d="([^"]+)"/g)].reduce((s, m) => s + new svgPathProperties(m[1]!).getTotalLength(), 0)
    expect(svgCut).toBeCloseTo(5 * one, 6)
    // Handbook check of the badge itself: ring 2π(30 + 20) + bar 2(6 + 50), cubic circles
    // within 0.03 %.
    expect(Math.abs(one / (2 * Math.PI * 50 + 112) - 1)).toBeLessThan(3e-4)

    const { entities } = parse(dxf!)
    const dxfCut = entities.filter((e) => e.layer === DXF_CUT_LAYER).reduce((s, e) => s + closedLength(e.vertices), 0)
    const dxfFrames = entities.filter((e) => e.layer === DXF_FRAME_LAYER).reduce((s, e) => s + closedLength(e.vertices), 0)
    expect(Math.abs(dxfCut / svgCut - 1)).toBeLessThan(0.001)
    // Frames are straight: 5 × 2 × (84 + 74) = 1580 mm in both.
    expect(svgFrames).toBeCloseTo(1580, 6)
    expect(dxfFrames).toBeCloseTo(1580, 6)
    expect(Math.abs((dxfCut + dxfFrames) / (svgCut + svgFrames) - 1)).toBeLessThan(0.001)
  })

  it('y is flipped (DXF y up): the L reads the same way up, hand-computed', () => {
    // L (bar x 5–15 / y 5–45, foot x 5–35 / y 35–45) as copy 1 at (5, 5) on a 200 × 120 sheet.
    // SVG sheet coordinates: bar top edge y = 10, foot bottom edge y = 50.
    // DXF: Y = 120 − y, so the bar's top is at Y = 110 (highest) and the foot's bottom at Y = 70.
    const L = readCleanVector(svgMm(L_BOX.width, L_BOX.height, [L_PATH]))
    const layout = layoutSheets({ copyWidthMm: 40, copyHeightMm: 50, copies: 1, sheetWidthMm: 200, sheetHeightMm: 120, gapMm: 6, marginMm: 5 })
    const [dxf] = cutSheetDxf({ curves: L.curves, copyWidthMm: 40, copyHeightMm: 50, layout, sheetWidthMm: 200, sheetHeightMm: 120, mirror: false, weedingFrameMm: null })
    const [e] = parse(dxf!).entities
    const pts = e!.vertices.map((v) => `${v.x},${v.y}`).sort()
    // Vertices (10,10) (20,10) (20,40) (40,40) (40,50) (10,50) in SVG → (x, 120 − y).
    expect(pts).toEqual(['10,110', '20,110', '20,80', '40,80', '40,70', '10,70'].sort())
    const top = Math.max(...e!.vertices.map((v) => v.y)), bottom = Math.min(...e!.vertices.map((v) => v.y))
    // The bar's top (x 10…20) is the highest part, the foot (x 10…40) the lowest.
    expect(e!.vertices.filter((v) => v.y === top).map((v) => v.x).sort((a, b) => a - b)).toEqual([10, 20])
    expect(e!.vertices.filter((v) => v.y === bottom).map((v) => v.x).sort((a, b) => a - b)).toEqual([10, 40])
  })

  it('a disc r = 25 mm: every vertex on the circle within the cubic error and rounding, perimeter within 0.1 % of 2πr', () => {
    // Handbook geometry: circumference 2πr. The disc's cubics stray ≤ 3e-4·r from the circle
    // (checked by sampling in path.test.ts), its 0.01 mm control points ≤ 0.0071 mm, and the
    // DXF's 0.01 mm vertices another ≤ 0.0071 mm; chords add ≤ 0.05 mm between vertices.
    const r = 25
    const disc = readCleanVector(svgMm(60, 60, [discPathData(30, 30, r)]))
    const layout = layoutSheets({ copyWidthMm: 60, copyHeightMm: 60, copies: 2, sheetWidthMm: 200, sheetHeightMm: 100, gapMm: 5, marginMm: 5 })
    const [dxf] = cutSheetDxf({ curves: disc.curves, copyWidthMm: 60, copyHeightMm: 60, layout, sheetWidthMm: 200, sheetHeightMm: 100, mirror: false, weedingFrameMm: null })
    const { entities } = parse(dxf!)
    expect(entities).toHaveLength(2)
    // Copy 2 at (5 + 65, 5): centre (70 + 30, 5 + 30) → DXF (100, 100 − 35) = (100, 65).
    const c = { x: 100, y: 65 }
    const vertexBound = 3e-4 * r + 0.0071 + 0.0071
    for (const v of entities[1]!.vertices) expect(Math.abs(Math.hypot(v.x - c.x, v.y - c.y) - r)).toBeLessThanOrEqual(vertexBound)
    const vs = entities[1]!.vertices
    for (let i = 0; i < vs.length; i++) {
      const a = vs[i]!, b = vs[(i + 1) % vs.length]!
      const m = { x: (a.x + b.x) / 2, y: (a.y + b.y) / 2 }
      expect(Math.abs(Math.hypot(m.x - c.x, m.y - c.y) - r)).toBeLessThanOrEqual(0.05 + vertexBound)
    }
    expect(Math.abs(closedLength(vs) / (2 * Math.PI * r) - 1)).toBeLessThan(0.001)
  })

  it('deterministic, one document per sheet like the SVG', () => {
    const input = badgeInput(13)
    expect(cutSheetDxf(input)).toEqual(cutSheetDxf(input))
    expect(cutSheetDxf(input)).toHaveLength(cutSheetSvg(input).length)
    expect(cutSheetDxf(input)).toHaveLength(3)
    expect(cutSheetDxf(input)[0]!.trimEnd().endsWith('0\r\nEOF')).toBe(true)
  })
})
