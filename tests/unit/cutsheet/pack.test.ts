// Batch packing: hand-counted single-design cases (at least the one-job grid), and mixed
// batches checked on the files as outside readers see them: the DXF read back by dxf-parser,
// overlaps by polygon-clipping (npm), distances by Shapely (Debian's python3-shapely), the
// whole file by ezdxf's auditor (python3-ezdxf).
import polygonClipping, { type Polygon } from 'polygon-clipping'
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { DXF_CUT_LAYER, DXF_FRAME_LAYER, DXF_LABEL_LAYER } from '../../../server/cutsheet/dxf'
import { packBatch, type PackInput } from '../../../server/cutsheet/pack'
import { readCleanVector } from '../../../server/cutsheet/path'
import { buildCutSheets, type BatchDesign, type BatchSheetInput } from '../../../server/cutsheet/sheet'
import { layoutSheets } from '../../../shared/utils/sheet-layout'
import { bbox, ezdxfAudit, polylines, readDxf, shapely, texts, type XY } from './reference'
import { L_BOX, L_PATH, discPathData, groupsOf, rectPathData, svgMm } from './shapes'

function design(id: string, svg: string, count: number, labels?: string[]): BatchDesign {
  const v = readCleanVector(svg)
  return { id, curves: v.curves, widthMm: v.widthMm, heightMm: v.heightMm, count, ...(labels ? { labels } : {}) }
}

// Shapes made in code: a badge (ring R 30 / r 20 and a bar), the L, a disc, a small square.
const BADGE = svgMm(80, 70, [discPathData(35, 35, 30) + discPathData(35, 35, 20, true), rectPathData(70, 10, 6, 50)])
const L = svgMm(L_BOX.width, L_BOX.height, [L_PATH])
const DISC = svgMm(25, 25, [discPathData(12.5, 12.5, 12)])
const SQUARE = svgMm(10, 10, [rectPathData(0, 0, 10, 10)])

const mixed = (): BatchDesign[] => [
  design('J12', BADGE, 3, ['J12-1', 'J12-2', 'J12-3']),
  design('J13', L, 5),
  design('J14', DISC, 12),
  design('J15', SQUARE, 20),
]

describe('packBatch: one design, against the one-job grid (hand counts from sheet-layout.test.ts)', () => {
  const base = { sheetWidthMm: 300, sheetHeightMm: 200, gapMm: 5, marginMm: 10 }
  it.each([
    // [copy w, h, sheet W, H, hand-counted grid count per sheet]
    [50, 30, 300, 200, 25], // 5 × 5 as drawn beats 8 × 3 turned
    [90, 40, 200, 300, 12], // turned: 4 × 3
    [70, 40, 200, 300, 12], // a tie: 2 × 6 as drawn
    [41.25, 41.25, 200, 200, 16], // exactly fits: 4 × 4
    [29.8, 29.8, 100, 100, 4], // margin 10: (100 − 20 + 5) / 34.8 = 2.44 → 2 × 2
  ])('%s × %s on %s × %s holds at least %s per sheet', (w, h, W, H, hand) => {
    expect(layoutSheets({ ...base, sheetWidthMm: W, sheetHeightMm: H, copyWidthMm: w, copyHeightMm: h, copies: 1 }).perSheet).toBe(hand)
    const count = 2 * hand + 1
    const p = packBatch({ ...base, sheetWidthMm: W, sheetHeightMm: H, designs: [{ id: 'A', widthMm: w, heightMm: h, count }] })
    expect(p.fits).toBe(true)
    expect(p.perSheet[0]!.copies).toBeGreaterThanOrEqual(hand)
    expect(p.sheets).toBeLessThanOrEqual(3)
    expect(p.copies).toHaveLength(count)
  })

  it('a tie keeps the grid, with the same placements as the one-job layout', () => {
    const p = packBatch({ ...base, designs: [{ id: 'A', widthMm: 50, heightMm: 30, count: 25 }] })
    expect(p.method).toBe('grid')
    // Last copy: row 4, column 4 → x = 10 + 4 × 55 = 230, y = 10 + 4 × 35 = 150 (hand-computed).
    expect(p.copies[24]!.box).toEqual({ x: 230, y: 150, width: 50, height: 30 })
    // Usage: 25 × 50 × 30 = 37 500 mm² of 60 000 mm² → 62.5 %.
    expect(p.perSheet[0]!.usagePercent).toBeCloseTo(62.5, 10)
  })

  it('mixing orientations beats the grid: 30 × 20 on 50 × 50, no gap or margin, fits 3 (grid: 2)', () => {
    // Grid as drawn: across 50 / 30 → 1, down 50 / 20 → 2 → 2; turned 20 × 30: 2 × 1 → 2.
    // Mixed: two as drawn stacked (0…30 × 0…40) and one turned beside them (30…50 × 0…30).
    const input: PackInput = { sheetWidthMm: 50, sheetHeightMm: 50, gapMm: 0, marginMm: 0, designs: [{ id: 'A', widthMm: 30, heightMm: 20, count: 3 }] }
    expect(layoutSheets({ ...input, copyWidthMm: 30, copyHeightMm: 20, copies: 3 }).perSheet).toBe(2)
    const p = packBatch(input)
    expect(p).toMatchObject({ method: 'packer', sheets: 1 })
    expect(p.copies.filter((c) => c.turned)).toHaveLength(1)
  })

  it('with turning off, no copy is turned', () => {
    const p = packBatch({ ...base, sheetWidthMm: 200, sheetHeightMm: 300, allowTurn: false, designs: [{ id: 'A', widthMm: 90, heightMm: 40, count: 12 }] })
    expect(p.copies.every((c) => !c.turned)).toBe(true)
    // 6 per sheet as drawn (1 × 6, hand count in sheet-layout.test.ts); the packer finds no more.
    expect(p.sheets).toBe(2)
  })
})

/** Splits the DXF's cut polylines into copies, using the SVG's copy order and each design's outline count. */
function copiesFromFiles(svg: string, dxf: string) {
  const defs = new Map([...svg.matchAll(/<path id="dw-design-([^"]+)" d="([^"]*)"\/>/g)].map((m) => [m[1]!, (m[2]!.match(/M/g) ?? []).length]))
  const uses = [...svg.matchAll(/<use id="dw-copy-([^"]+)" xlink:href="#dw-design-([^"]+)"/g)].map((m) => ({ id: m[1]!, design: m[2]! }))
  const cut = polylines(readDxf(dxf).entities, DXF_CUT_LAYER)
  let i = 0
  const copies = uses.map((u) => {
    const n = defs.get(u.design)!
    const rings = cut.slice(i, i + n).map((p) => p.vertices)
    i += n
    return { ...u, rings }
  })
  expect(i).toBe(cut.length)
  return copies
}

const ring = (pts: XY[]): [number, number][] => [...pts.map((p): [number, number] => [p.x, p.y]), [pts[0]!.x, pts[0]!.y]]

describe('buildCutSheets: a mixed batch, checked on the files', () => {
  const input: BatchSheetInput = {
    designs: mixed(), sheetWidthMm: 300, sheetHeightMm: 200, gapMm: 4, marginMm: 6, kerfMm: 0.2,
    labels: { mode: 'text' },
  }
  const out = buildCutSheets(input)

  it('every copy once, labels unique, sheets numbered, usage per sheet from the drawn sizes', () => {
    const all = out.sheets.flatMap((s) => s.copiesOnSheet)
    expect(all).toHaveLength(3 + 5 + 12 + 20)
    expect(new Set(all.map((c) => c.label)).size).toBe(all.length)
    expect(all.filter((c) => c.designId === 'J12').map((c) => c.label).sort()).toEqual(['J12-1', 'J12-2', 'J12-3'])
    expect(all.filter((c) => c.designId === 'J13').map((c) => c.label).sort()).toEqual(['J13-1', 'J13-2', 'J13-3', 'J13-4', 'J13-5'])
    const area: Record<string, number> = { J12: 80 * 70, J13: 40 * 50, J14: 25 * 25, J15: 10 * 10 }
    for (const s of out.sheets) {
      expect(s.usagePercent).toBeCloseTo(s.copiesOnSheet.reduce((a, c) => a + area[c.designId]!, 0) / (300 * 200) * 100, 9)
    }
    // 3 × 5600 + 5 × 2000 + 12 × 625 + 20 × 100 = 36 300 mm², 60.5 % of one 300 × 200 sheet:
    // with gaps and labels it may need a second sheet, never a third.
    expect(out.sheets.length).toBeLessThanOrEqual(2)
  })

  it('no two copies overlap (polygon-clipping) and they stay at least the gap apart (Shapely), all inside the margin — on the DXF read back by dxf-parser', () => {
    for (const sheet of out.sheets) {
      const copies = copiesFromFiles(sheet.svg!, sheet.dxf!)
      expect(copies.map((c) => c.id).sort()).toEqual(sheet.copiesOnSheet.map((c) => c.label).sort())
      // Inside the margin: every vertex within 6 … 300 − 6 × 6 … 200 − 6.
      for (const c of copies) for (const r of c.rings) for (const p of r) {
        expect(p.x).toBeGreaterThanOrEqual(6 - 1e-9)
        expect(p.x).toBeLessThanOrEqual(294 + 1e-9)
        expect(p.y).toBeGreaterThanOrEqual(6 - 1e-9)
        expect(p.y).toBeLessThanOrEqual(194 + 1e-9)
      }
      // Each copy's footprint: the union of its closed outlines.
      const footprints = copies.map((c) => {
        const [first, ...rest] = c.rings.map((r): Polygon => [ring(r)])
        return polygonClipping.union(first!, ...rest)
      })
      for (let i = 0; i < copies.length; i++) {
        for (let j = i + 1; j < copies.length; j++) {
          expect(polygonClipping.intersection(footprints[i]!, footprints[j]!), `${copies[i]!.id} and ${copies[j]!.id}`).toEqual([])
        }
      }
      const d = shapely<{ min: number, pair: string[] }>(`
polys = [unary_union([Polygon(r).buffer(0) for r in c["rings"]]) for c in data]
best, pair = 1e9, []
for i in range(len(polys)):
    for j in range(i + 1, len(polys)):
        dist = polys[i].distance(polys[j])
        if dist < best:
            best, pair = dist, [data[i]["id"], data[j]["id"]]
print(json.dumps({"min": best, "pair": pair}))
`, copies.map((c) => ({ id: c.id, rings: c.rings.map((r) => r.map((p) => [p.x, p.y])) })))
      expect(d.min, `closest: ${d.pair.join(' and ')}`).toBeGreaterThanOrEqual(4 - 1e-9)
    }
  })

  it('labels: one TEXT per copy on its own layer, outside every copy (Shapely), inside the margin', () => {
    for (const sheet of out.sheets) {
      const { entities } = readDxf(sheet.dxf!)
      const labels = texts(entities, DXF_LABEL_LAYER)
      expect(labels.map((t) => t.text).sort()).toEqual(sheet.copiesOnSheet.map((c) => c.label).sort())
      for (const t of labels) {
        expect(t.textHeight).toBe(2.5)
        expect(t.halign).toBe(5) // fitted between its two points (DXF R12 TEXT, 72 = 5)
      }
      // The room each label's text takes: its baseline from start to end point and a cap
      // height on the side its letters stand (above it; for text turned to read down the
      // sheet, to the right of it: the text's up is turned 90° clockwise with it).
      const boxes = labels.map((t) => {
        const a = t.startPoint, b = t.endPoint!
        return a.y === b.y
          ? [[a.x, a.y], [b.x, b.y], [b.x, b.y + 2.5], [a.x, a.y + 2.5]]
          : [[a.x, a.y], [b.x, b.y], [b.x + 2.5, b.y], [a.x + 2.5, a.y]]
      })
      const copies = copiesFromFiles(sheet.svg!, sheet.dxf!)
      const r = shapely<{ min: number }>(`
cut = unary_union([Polygon(r).buffer(0) for c in data["copies"] for r in c])
print(json.dumps({"min": min(Polygon(b).distance(cut) for b in data["boxes"])}))
`, { copies: copies.map((c) => c.rings.map((rr) => rr.map((p) => [p.x, p.y]))), boxes })
      // Outside every copy, by the 1 mm label gap at least.
      expect(r.min).toBeGreaterThanOrEqual(1 - 0.011)
      for (const b of boxes) for (const [x, y] of b as [number, number][]) {
        expect(x).toBeGreaterThanOrEqual(6 - 0.011)
        expect(y).toBeGreaterThanOrEqual(6 - 0.011)
        expect(x).toBeLessThanOrEqual(294 + 0.011)
        expect(y).toBeLessThanOrEqual(194 + 0.011)
      }
      // The SVG carries the same labels in a group of their own, and as the copies' ids.
      expect(sheet.svg).toMatch(new RegExp(`<g id="dw-sheet-${sheet.sheet}-labels" fill="#[0-9a-f]{6}" stroke="none"`))
      for (const c of sheet.copiesOnSheet) {
        expect(sheet.svg).toContain(`<use id="dw-copy-${c.label}"`)
        expect(sheet.svg).toContain(`>${c.label}</text>`)
      }
    }
  })

  it('ezdxf reads each sheet as R12 and its auditor finds no errors; entity counts agree with dxf-parser', () => {
    for (const sheet of out.sheets) {
      const a = ezdxfAudit(sheet.dxf!)
      expect(a.version).toBe('AC1009') // R12
      expect(a.errors).toEqual([])
      const { entities } = readDxf(sheet.dxf!)
      expect(a.counts.POLYLINE).toBe(polylines(entities, DXF_CUT_LAYER).length)
      expect(a.counts.TEXT).toBe(sheet.copiesOnSheet.length)
    }
  })

  it('SVG: the sheet in mm (W3C SVG 1.1 §7.10, 1 mm per user unit), one colour, each design defined once', async () => {
    for (const sheet of out.sheets) {
      const svg = sheet.svg!
      expect(svg).toMatch(/^<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg"[^>]* width="300mm" height="200mm" viewBox="0 0 300 200">/)
      // librsvg (through sharp) at 72 px per inch, 25.4 mm to the inch (CSS Values and Units 3 §5.2).
      const meta = await sharp(Buffer.from(svg)).metadata()
      expect([meta.width, meta.height]).toEqual([Math.round(300 / 25.4 * 72), Math.round(200 / 25.4 * 72)])
      expect(new Set([...svg.matchAll(/(?:stroke|fill)="(#[0-9a-f]{6})"/g)].map((m) => m[1]))).toEqual(new Set(['#2f5d50']))
      const used = new Set(sheet.copiesOnSheet.map((c) => c.designId))
      expect(svg.match(/<path id="dw-design-/g)).toHaveLength(used.size)
      expect(svg.match(/<use /g)).toHaveLength(sheet.copiesOnSheet.length)
      expect(svg).toContain('cut paths compensated for a 0.2 mm kerf')
    }
  })

  it('labels only as ids: no text, no room for it, the ids stay on the SVG copies', () => {
    const ids = buildCutSheets({ ...input, labels: { mode: 'ids' } })
    for (const sheet of ids.sheets) {
      expect(sheet.svg).not.toContain('<text')
      expect(texts(readDxf(sheet.dxf!).entities, DXF_LABEL_LAYER)).toEqual([])
      for (const c of sheet.copiesOnSheet) expect(sheet.svg).toContain(`<use id="dw-copy-${c.label}"`)
    }
  })
})

describe('buildCutSheets: weeding frames, mirroring and turning in a batch', () => {
  it('frames keep the gap between them and stay inside the margin; copies inside their frames (DXF read back)', () => {
    const out = buildCutSheets({
      designs: mixed(), sheetWidthMm: 300, sheetHeightMm: 200, gapMm: 3, marginMm: 5, kerfMm: 0, weedingFrameMm: 2, mirror: true,
    })
    for (const sheet of out.sheets) {
      const { entities } = readDxf(sheet.dxf!)
      const frames = polylines(entities, DXF_FRAME_LAYER).map((p) => bbox(p.vertices))
      expect(frames).toHaveLength(sheet.copiesOnSheet.length)
      for (const f of frames) {
        expect(f.x0).toBeGreaterThanOrEqual(5 - 1e-9)
        expect(f.y0).toBeGreaterThanOrEqual(5 - 1e-9)
        expect(f.x1).toBeLessThanOrEqual(295 + 1e-9)
        expect(f.y1).toBeLessThanOrEqual(195 + 1e-9)
      }
      // Two frames either lie apart by the gap along x or along y.
      for (let i = 0; i < frames.length; i++) for (let j = i + 1; j < frames.length; j++) {
        const a = frames[i]!, b = frames[j]!
        const apart = Math.max(b.x0 - a.x1, a.x0 - b.x1, b.y0 - a.y1, a.y0 - b.y1)
        expect(apart).toBeGreaterThanOrEqual(3 - 1e-9)
      }
      // Each copy lies inside one frame, 2 mm in from it at its box.
      const copies = copiesFromFiles(sheet.svg!, sheet.dxf!)
      for (const c of copies) {
        const b = bbox(c.rings.flat())
        expect(frames.some((f) => b.x0 >= f.x0 + 2 - 1e-9 && b.x1 <= f.x1 - 2 + 1e-9 && b.y0 >= f.y0 + 2 - 1e-9 && b.y1 <= f.y1 - 2 + 1e-9)).toBe(true)
      }
    }
    // Mirrored: the L's bar moves from the left of its foot to the right (hand-computed, x → 40 − x).
    const svg = out.sheets.map((s) => s.svg!).join('')
    const l = groupsOf(svg).find((g) => g.id === 'dw-copy-J13-1')!
    expect(l.transform).toMatch(/^matrix\(-1 0 0 1 |^matrix\(0 -?1 -?1 0 /)
  })
})

describe('refused input', () => {
  const one = (extra: Partial<PackInput>) => packBatch({ sheetWidthMm: 100, sheetHeightMm: 100, gapMm: 2, marginMm: 5, designs: [{ id: 'A', widthMm: 20, heightMm: 20, count: 2 }], ...extra })
  it('a copy that does not fit says which and why', () => {
    const p = one({ designs: [{ id: 'A', widthMm: 20, heightMm: 20, count: 1 }, { id: 'Big', widthMm: 95, heightMm: 40, count: 1 }] })
    expect(p.fits).toBe(false)
    expect(p.reason).toMatch(/Design Big \(95 × 40 mm\) does not fit on a 100 × 100 mm sheet with a 5 mm margin, not even turned 90°/)
    expect(() => buildCutSheets({ sheetWidthMm: 100, sheetHeightMm: 100, gapMm: 2, marginMm: 5, designs: [design('Big', svgMm(95, 40, [rectPathData(0, 0, 95, 40)]), 1)] })).toThrow(/does not fit/)
  })
  it('bad ids, labels, counts and repeated labels', () => {
    expect(() => one({ designs: [{ id: 'a b', widthMm: 20, heightMm: 20, count: 1 }] })).toThrow(/design id/)
    expect(() => one({ designs: [{ id: 'A', widthMm: 20, heightMm: 20, count: 1, labels: ['<x>'] }] })).toThrow(/copy label/)
    expect(() => one({ designs: [{ id: 'A', widthMm: 20, heightMm: 20, count: 2, labels: ['X'] }] })).toThrow(/2 copies but 1 labels/)
    expect(() => one({ designs: [{ id: 'A', widthMm: 20, heightMm: 20, count: 1, labels: ['X'] }, { id: 'B', widthMm: 20, heightMm: 20, count: 1, labels: ['X'] }] })).toThrow(/given to two copies/)
    expect(() => one({ designs: [{ id: 'A', widthMm: 20, heightMm: 20, count: 1.5 }] })).toThrow(/whole number/)
    expect(() => one({ designs: [] })).toThrow(/at least one design/)
    expect(() => one({ labels: { mode: 'loud' as 'text' } })).toThrow(/label mode/)
  })
})
