import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { readCleanVector } from '../../../server/cutsheet/path'
import { CUT_STROKE, HAIRLINE_MM, cutSheetPreviewSvg, cutSheetSvg, type CutSheetSvgInput } from '../../../server/cutsheet/svg'
import { parsePathData } from '../../../server/pipeline/svgpath'
import { layoutSheets } from '../../../shared/utils/sheet-layout'
import { L_BOX, L_PATH, applyMatrix, discPathData, groupsOf, parseTransform, rectPathData, svgMm } from './shapes'

const L = readCleanVector(svgMm(L_BOX.width, L_BOX.height, [L_PATH]))

function lInput(sheetW: number, sheetH: number, copies: number, extra: Partial<CutSheetSvgInput> = {}): CutSheetSvgInput {
  const layout = layoutSheets({ copyWidthMm: L_BOX.width, copyHeightMm: L_BOX.height, copies, sheetWidthMm: sheetW, sheetHeightMm: sheetH, gapMm: 6, marginMm: 5 })
  return { curves: L.curves, copyWidthMm: L_BOX.width, copyHeightMm: L_BOX.height, layout, sheetWidthMm: sheetW, sheetHeightMm: sheetH, mirror: false, weedingFrameMm: null, ...extra }
}

/** The sheet coordinates of copy N's vertices, read from the file by an independent reader. */
function copyVertices(svg: string, n: number) {
  const g = groupsOf(svg).find((x) => x.id === `dw-copy-${n}`)!
  const m = parseTransform(g.transform!)
  return g.paths.flatMap((d) => parsePathData(d).flatMap((sp) => sp.segments.map((s) => applyMatrix(m, s.from))))
}

const xsAtY = (pts: { x: number, y: number }[], y: number) => [...new Set(pts.filter((p) => Math.abs(p.y - y) < 1e-9).map((p) => p.x))].sort((a, b) => a - b)

describe('cutSheetSvg: physical size', () => {
  it('root width/height in mm and a viewBox in mm (W3C SVG 1.1 §7 coordinate systems and units)', () => {
    const [sheet] = cutSheetSvg(lInput(200, 120, 5))
    // SVG 1.1 §7.10: width/height may carry a unit identifier; "mm" is an absolute length.
    // SVG 1.1 §7.7: viewBox "0 0 200 120" maps onto 200mm × 120mm, so one user unit = 1 mm.
    expect(sheet).toMatch(/^<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg"[^>]* width="200mm" height="120mm" viewBox="0 0 200 120">/)
  })

  it('an independent renderer (librsvg through sharp) reads "mm" as an absolute length: 25.4 mm to the inch', async () => {
    // CSS Values and Units 3 §5.2: 1in = 2.54cm = 25.4mm. The 200 × 120 mm sheet must render
    // exactly as large as a (200 / 25.4)in × (120 / 25.4)in document, or a 20cm × 12cm one.
    const [sheet] = cutSheetSvg(lInput(200, 120, 5))
    const doc = (w: string, h: string) => `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}" viewBox="0 0 200 120"><rect width="200" height="120"/></svg>`
    const size = async (svg: string) => { const m = await sharp(Buffer.from(svg)).metadata(); return [m.width, m.height] }
    const ours = await size(sheet!)
    expect(ours).toEqual(await size(doc(`${200 / 25.4}in`, `${120 / 25.4}in`)))
    expect(ours).toEqual(await size(doc('20cm', '12cm')))
    // sharp rasterises vector input at 72 dpi by default (its density option; observed here,
    // and in its documentation from memory): 200 mm → 200 / 25.4 × 72 = 566.9 → 567 px,
    // 120 mm → 340.2 → 340 px.
    expect(ours).toEqual([567, 340])
  })
})

describe('cutSheetSvg: content', () => {
  it('one stroke colour, fill none, hairline, our group ids; no sheet outline in a cut file', () => {
    const [sheet] = cutSheetSvg(lInput(200, 120, 5, { weedingFrameMm: 3 }))
    const strokes = [...sheet!.matchAll(/stroke="([^"]+)"/g)].map((m) => m[1])
    expect(new Set(strokes)).toEqual(new Set([CUT_STROKE]))
    expect(sheet).toContain(`<g id="dw-sheet-1" fill="none" stroke="${CUT_STROKE}" stroke-width="${HAIRLINE_MM}">`)
    expect(HAIRLINE_MM).toBe(0.1) // a common practice for laser cutting files, not a standard
    expect(sheet).not.toMatch(/fill="(?!none)/)
    const ids = groupsOf(sheet!).map((g) => g.id)
    // Every copy, then the frames that free them (inner cuts first).
    expect(ids).toEqual(['dw-copy-1', 'dw-copy-2', 'dw-copy-3', 'dw-copy-4', 'dw-copy-5', 'dw-frame-1', 'dw-frame-2', 'dw-frame-3', 'dw-frame-4', 'dw-frame-5'])
    // The copy's path is defined once and placed by reference five times.
    expect(sheet!.match(/<path id="dw-design-/g)).toHaveLength(1)
    expect(sheet!.match(/<use /g)).toHaveLength(5)
    expect(sheet).not.toMatch(/outline|dasharray/)
  })

  it('places copies where the layout says: the L as drawn at (5, 5) and (51, 5)', () => {
    // 40 × 50 on 200 × 120, gap 6, margin 5: across (200 − 10 + 6) / 46 = 4.26 → 4, down
    // (120 − 10 + 6) / 56 = 2.07 → 2. Copy 2 at x = 5 + 46 = 51.
    const [sheet] = cutSheetSvg(lInput(200, 120, 5))
    // Bar's top edge, local x 5…15 at y 5 → sheet x 10…20 at y 10 for copy 1, 56…66 for copy 2.
    expect(xsAtY(copyVertices(sheet!, 1), 10)).toEqual([10, 20])
    expect(xsAtY(copyVertices(sheet!, 2), 10)).toEqual([56, 66])
    // Foot's bottom edge, local x 5…35 at y 45 → sheet 10…40 at y 50.
    expect(xsAtY(copyVertices(sheet!, 1), 50)).toEqual([10, 40])
  })

  it('mirrored: each copy flips within its own box, x → 40 − x (hand-computed)', () => {
    const [sheet] = cutSheetSvg(lInput(200, 120, 5, { mirror: true }))
    // The bar x 5…15 becomes 40 − 15 … 40 − 5 = 25…35 in the box, 30…40 on the sheet (copy 1
    // at x = 5): the bar moves from the foot's left end to its right end.
    expect(xsAtY(copyVertices(sheet!, 1), 10)).toEqual([30, 40])
    // The foot x 5…35 becomes 5…35: the same extents, 10…40 on the sheet.
    expect(xsAtY(copyVertices(sheet!, 1), 50)).toEqual([10, 40])
    // Copy 5 (second row, y = 5 + 56 = 61): bar top at y 66, x 30…40.
    expect(xsAtY(copyVertices(sheet!, 5), 66)).toEqual([30, 40])
  })

  it('turned: 90° clockwise within the box, (x, y) → (50 − y, x) (hand-computed)', () => {
    // 40 × 50 on 110 × 50, gap 6, margin 5: as drawn down (50 − 10 + 6) / 56 → 0; turned
    // 50 × 40: across (110 − 10 + 6) / 56 = 1.89 → 1, down (50 − 10 + 6) / 46 = 1 → 1.
    const input = lInput(110, 50, 1)
    expect(input.layout).toMatchObject({ turned: true, perSheet: 1 })
    const [sheet] = cutSheetSvg(input)
    const v = copyVertices(sheet!, 1)
    // The bar's top edge, local (5…15, 5) → (50 − 5, 5…15) = (45, 5…15) → sheet (50, 10…20):
    // the top of the L now points right, as a clockwise turn does.
    const atX50 = [...new Set(v.filter((p) => Math.abs(p.x - 50) < 1e-9).map((p) => p.y))].sort((a, b) => a - b)
    expect(atX50).toEqual([10, 20])
    // The foot's bottom edge, local (5…35, 45) → (5, 5…35) → sheet (10, 10…40): now on the left.
    const atX10 = [...new Set(v.filter((p) => Math.abs(p.x - 10) < 1e-9).map((p) => p.y))].sort((a, b) => a - b)
    expect(atX10).toEqual([10, 40])
    // Mirrored and turned: (x, y) → (50 − y, 40 − x): the bar's top edge → (45, 35…25) → sheet (50, 30…40).
    const [both] = cutSheetSvg({ ...input, mirror: true })
    const w = copyVertices(both!, 1)
    expect([...new Set(w.filter((p) => Math.abs(p.x - 50) < 1e-9).map((p) => p.y))].sort((a, b) => a - b)).toEqual([30, 40])
  })

  it('weeding frames: a rectangle at the given offset around each copy box', () => {
    const [sheet] = cutSheetSvg(lInput(200, 120, 2, { weedingFrameMm: 2.5 }))
    const frames = groupsOf(sheet!).filter((g) => g.id.startsWith('dw-frame-'))
    // Copy 2 box 51…91 × 5…55, frame 2.5 mm out: 48.5…93.5 × 2.5…57.5.
    expect(frames[1]!.paths).toEqual(['M48.5 2.5H93.5V57.5H48.5Z'])
    expect(frames[1]!.transform).toBeNull()
  })

  it('a layout made with the weeding frame keeps the gap between frames', () => {
    // L 40 × 50, frame 2, gap 6, margin 5 on 200 × 120: boxes 10 apart, 7 from the edges.
    // As drawn: across (200 − 14 + 10) / 50 = 3.92 → 3, down (120 − 14 + 10) / 60 = 1.93 → 1 → 3.
    // Turned 50 × 40: across 196 / 60 = 3.27 → 3, down 116 / 50 = 2.32 → 2 → 6. Turned wins.
    const layout = layoutSheets({ copyWidthMm: 40, copyHeightMm: 50, copies: 2, sheetWidthMm: 200, sheetHeightMm: 120, gapMm: 6, marginMm: 5, weedingFrameMm: 2 })
    expect(layout).toMatchObject({ turned: true, perSheet: 6 })
    const [sheet] = cutSheetSvg({ ...lInput(200, 120, 1), layout, weedingFrameMm: 2 })
    const frames = groupsOf(sheet!).filter((g) => g.id.startsWith('dw-frame-')).map((g) => g.paths[0])
    // Turned box 50 × 40: copy 1 at (7, 7) → frame 5…59 × 5…49; copy 2 at 7 + 60 = 67 → frame
    // 65…119: 6 mm of film (the gap) between the frames.
    expect(frames).toEqual(['M5 5H59V49H5Z', 'M65 5H119V49H65Z'])
  })

  it('several sheets: one document each, copies numbered over the job', () => {
    // 8 per sheet (4 × 2, above): 19 copies → 3 sheets of 8, 8, 3.
    const sheets = cutSheetSvg(lInput(200, 120, 19))
    expect(sheets).toHaveLength(3)
    expect(groupsOf(sheets[2]!).map((g) => g.id)).toEqual(['dw-copy-17', 'dw-copy-18', 'dw-copy-19'])
    expect(sheets[2]).toContain('<g id="dw-sheet-3"')
    expect(sheets[1]).toContain('cut sheet 2 of 3')
  })

  it('deterministic and on the 0.01 mm grid', () => {
    const shape = readCleanVector(svgMm(50, 50, [discPathData(25, 25, 20.004), rectPathData(10.333, 10.333, 5, 5)]))
    const layout = layoutSheets({ copyWidthMm: 50, copyHeightMm: 50, copies: 7, sheetWidthMm: 210, sheetHeightMm: 297, gapMm: 3.333, marginMm: 7.777 })
    const input = { curves: shape.curves, copyWidthMm: 50, copyHeightMm: 50, layout, sheetWidthMm: 210, sheetHeightMm: 297, mirror: true, weedingFrameMm: 1.5 }
    const a = cutSheetSvg(input), b = cutSheetSvg(input)
    expect(a).toEqual(b)
    const numbers = a.join('').replace(/<!--[\s\S]*?-->/g, '').replace(/#[0-9a-f]{6}/g, '').match(/-?\d*\.\d+/g) ?? []
    for (const v of numbers) expect(v).toMatch(/^-?\d*\.\d{1,2}$/)
  })
})

describe('cutSheetPreviewSvg', () => {
  it('joins the sheets side by side with a dashed film edge marked as preview only', () => {
    const sheets = cutSheetSvg(lInput(200, 120, 10))
    expect(sheets).toHaveLength(2)
    const preview = cutSheetPreviewSvg(sheets, { spacingMm: 10 })
    // 200 + 10 + 200 = 410 mm wide, 120 mm high.
    expect(preview).toMatch(/^<svg [^>]*width="410mm" height="120mm" viewBox="0 0 410 120">/)
    expect(preview).toContain('<g id="dw-preview-2" transform="translate(210 0)">')
    expect(preview).toMatch(/<g id="dw-sheet-outline-1"[^>]*stroke-dasharray/)
    expect(preview).toContain('preview only, not a cut')
    expect(preview.match(/<use id="dw-copy-\d+"/g)).toHaveLength(10)
    // Each design defined once in the joined document, and every reference resolves.
    expect(preview.match(/<path id="dw-design-1"/g)).toHaveLength(1)
    expect(groupsOf(preview).filter((g) => g.id.startsWith('dw-copy-'))).toHaveLength(10)
  })
})

describe('cutSheetSvg: refused input', () => {
  it('a layout that does not fit', () => {
    const input = lInput(30, 30, 1)
    expect(input.layout.fits).toBe(false)
    expect(() => cutSheetSvg(input)).toThrow(/does not fit/)
  })

  it('weeding frames that would cross (gap 6 < 2 × 3.5) or leave the sheet (margin 5 < 5.5)', () => {
    expect(() => cutSheetSvg(lInput(200, 120, 5, { weedingFrameMm: 3.5 }))).toThrow(/gap of at least 7 mm/)
    expect(() => cutSheetSvg(lInput(200, 120, 1, { weedingFrameMm: 5.5 }))).toThrow(/margin must be at least/)
    expect(() => cutSheetSvg(lInput(200, 120, 1, { weedingFrameMm: 0 }))).toThrow(RangeError)
  })

  it('a layout made for another copy size, and an empty copy', () => {
    const input = lInput(200, 120, 5)
    expect(() => cutSheetSvg({ ...input, copyWidthMm: 60 })).toThrow(/outside/)
    expect(() => cutSheetSvg({ ...input, curves: [] })).toThrow(/nothing to cut/)
    expect(() => cutSheetSvg({ ...input, strokeMm: -1 })).toThrow(RangeError)
  })
})
