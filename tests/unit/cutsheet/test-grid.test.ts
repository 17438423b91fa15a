// The film's test grid (issue 9): settings worked by hand, the files read back by dxf-parser,
// audited by ezdxf, measured with Shapely, and rendered by librsvg for their size in mm.
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { DXF_CUT_LAYER, DXF_LABEL_LAYER } from '../../../server/cutsheet/dxf'
import { testGrid } from '../../../server/cutsheet/test-grid'
import { bbox, ezdxfAudit, polylines, readDxf, shapely, texts } from './reference'
import { groupsOf } from './shapes'

const grid = testGrid({ power: { from: 40, to: 70, steps: 4 }, speed: { from: 10, to: 30, steps: 5 } })

describe('testGrid', () => {
  it('rows are power steps, columns speed steps, squares labelled by position (hand-computed)', () => {
    // 40 → 70 in 4 steps: 40, 50, 60, 70; 10 → 30 in 5 steps: 10, 15, 20, 25, 30.
    expect(grid.rows).toEqual([{ letter: 'A', powerPercent: 40 }, { letter: 'B', powerPercent: 50 }, { letter: 'C', powerPercent: 60 }, { letter: 'D', powerPercent: 70 }])
    expect(grid.columns.map((c) => c.speedMmS)).toEqual([10, 15, 20, 25, 30])
    expect(grid.squares).toHaveLength(20)
    expect(grid.squares.map((s) => s.label)).toEqual(['A1', 'A2', 'A3', 'A4', 'A5', 'B1', 'B2', 'B3', 'B4', 'B5', 'C1', 'C2', 'C3', 'C4', 'C5', 'D1', 'D2', 'D3', 'D4', 'D5'])
    expect(grid.squares.find((s) => s.label === 'C4')).toMatchObject({ row: 2, column: 3, powerPercent: 60, speedMmS: 25 })
    // Uneven steps round to 0.1: 1 → 2 in 4 steps is 1, 1.33, 1.67, 2.
    expect(testGrid({ power: { from: 1, to: 2, steps: 4 }, speed: { from: 5, to: 5, steps: 1 } }).rows.map((r) => r.powerPercent)).toEqual([1, 1.3, 1.7, 2])
  })

  it('DXF read back by dxf-parser: 20 closed 10 mm squares in a grid, a label below each, the legend as text', () => {
    const { entities, header } = readDxf(grid.dxf)
    expect(header.$ACADVER).toBe('AC1009')
    const squares = polylines(entities, DXF_CUT_LAYER)
    expect(squares).toHaveLength(20)
    for (const p of squares) {
      expect(p.shape).toBe(true)
      const b = bbox(p.vertices)
      expect(b.x1 - b.x0).toBe(10)
      expect(b.y1 - b.y0).toBe(10)
    }
    const ts = texts(entities, DXF_LABEL_LAYER)
    const byText = new Map(ts.map((t) => [t.text, t]))
    for (const s of grid.squares) {
      const t = byText.get(s.label)!
      // Left-aligned with its square, its baseline 1 mm + a 2.5 mm cap height below it (DXF y up).
      expect(t.startPoint.x).toBeCloseTo(s.box.x, 9)
      expect(t.startPoint.y).toBeCloseTo(grid.heightMm - (s.box.y + 10 + 1 + 2.5), 9)
    }
    expect(byText.has('A: 40')).toBe(true)
    expect(byText.has('D: 70')).toBe(true)
    expect(byText.has('1: 10')).toBe(true)
    expect(byText.has('5: 30')).toBe(true)
    expect(byText.has('Rows: power %. Columns: speed mm/s.')).toBe(true)
    expect(ts).toHaveLength(20 + 4 + 5 + 1)
    // Each header sits in line with its row or column: row C's head halfway down row C's squares.
    const c1 = grid.squares.find((s) => s.label === 'C1')!
    expect(byText.get('C: 60')!.startPoint.y).toBeCloseTo(grid.heightMm - (c1.box.y + 5 + 1.25), 9)
    expect(byText.get('4: 25')!.startPoint.x).toBeCloseTo(grid.squares.find((s) => s.label === 'A4')!.box.x, 9)
  })

  it('no text touches a square and every square is inside the page by the margin (Shapely)', () => {
    const { entities } = readDxf(grid.dxf)
    const squares = polylines(entities, DXF_CUT_LAYER).map((p) => p.vertices.map((v) => [v.x, v.y]))
    const boxes = texts(entities, DXF_LABEL_LAYER).map((t) => [[t.startPoint.x, t.startPoint.y], [t.endPoint!.x, t.endPoint!.y], [t.endPoint!.x, t.endPoint!.y + t.textHeight], [t.startPoint.x, t.startPoint.y + t.textHeight]])
    const r = shapely<{ textToSquare: number, squaresApart: number, inside: boolean }>(`
sq = [Polygon(s) for s in data["squares"]]
tx = unary_union([Polygon(b) for b in data["boxes"]])
page = box(5, 5, data["w"] - 5, data["h"] - 5)
print(json.dumps({
  "textToSquare": min(s.distance(tx) for s in sq),
  "squaresApart": min(sq[i].distance(sq[j]) for i in range(len(sq)) for j in range(i + 1, len(sq))),
  "inside": all(page.contains(s) for s in sq) and page.buffer(1e-9).contains(tx),
}))
`, { squares, boxes, w: grid.widthMm, h: grid.heightMm })
    expect(r.textToSquare).toBeGreaterThanOrEqual(1 - 1e-9)
    expect(r.squaresApart).toBeGreaterThanOrEqual(4 - 1e-9)
    expect(r.inside).toBe(true)
  })

  it('SVG: the page in mm (W3C SVG 1.1 §7.10; rendered by librsvg through sharp at 72 dpi), one square defined once and used 20 times', async () => {
    expect(grid.svg).toMatch(new RegExp(`width="${grid.widthMm}mm" height="${grid.heightMm}mm" viewBox="0 0 ${grid.widthMm} ${grid.heightMm}"`))
    const meta = await sharp(Buffer.from(grid.svg)).metadata()
    // CSS Values and Units 3 §5.2: 1in = 25.4mm; sharp rasterises at 72 px per inch.
    expect(meta.width).toBe(Math.round(grid.widthMm / 25.4 * 72))
    expect(meta.height).toBe(Math.round(grid.heightMm / 25.4 * 72))
    expect(grid.svg.match(/<path id="dw-design-square"/g)).toHaveLength(1)
    const uses = groupsOf(grid.svg).filter((g) => g.id.startsWith('dw-copy-'))
    expect(uses.map((u) => u.id)).toEqual(grid.squares.map((s) => `dw-copy-${s.label}`))
    expect(grid.svg).toContain('<g id="dw-sheet-1-labels"')
    expect(grid.svg).toContain('>Rows: power %. Columns: speed mm/s.</text>')
  })

  it('ezdxf reads it as R12 and audits it without errors', () => {
    const a = ezdxfAudit(grid.dxf)
    expect(a.version).toBe('AC1009')
    expect(a.errors).toEqual([])
    expect(a.counts).toMatchObject({ POLYLINE: 20, TEXT: 30 })
  })

  it('kerf compensated on request: squares cut 10.2 mm for a 0.2 mm kerf', () => {
    const k = testGrid({ power: { from: 40, to: 40, steps: 1 }, speed: { from: 10, to: 20, steps: 2 }, kerfMm: 0.2 })
    for (const p of polylines(readDxf(k.dxf).entities, DXF_CUT_LAYER)) {
      const b = bbox(p.vertices)
      expect(b.x1 - b.x0).toBeCloseTo(10.2, 9)
    }
  })

  it('refuses ranges it cannot draw, and a grid larger than the film sheet', () => {
    expect(() => testGrid({ power: { from: 0, to: 50, steps: 3 }, speed: { from: 10, to: 20, steps: 2 } })).toThrow(/power must be more than 0/)
    expect(() => testGrid({ power: { from: 10, to: 120, steps: 3 }, speed: { from: 10, to: 20, steps: 2 } })).toThrow(/at most 100 %/)
    expect(() => testGrid({ power: { from: 10, to: 50, steps: 27 }, speed: { from: 10, to: 20, steps: 2 } })).toThrow(/1 to 26 steps/)
    expect(() => testGrid({ power: { from: 10, to: 50, steps: 2 }, speed: { from: 10, to: 20, steps: 1 } })).toThrow(/same first and last/)
    expect(() => testGrid({ power: { from: 10, to: 50, steps: 2 }, speed: { from: 10, to: 20, steps: 2 }, sheetWidthMm: 40, sheetHeightMm: 40 })).toThrow(/does not fit/)
  })
})
