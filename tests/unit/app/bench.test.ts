import { describe, expect, it } from 'vitest'
import type { Measurements } from '../../../shared/types/pipeline'
import { BENCH_DEFAULTS, decalSizeMm, normaliseSettings, sameSettings } from '../../../app/utils/bench-settings'
import {
  clampView, cropFromPoints, fitCrop, fitView, frameRect, panByScreen, panByStep, screenToWorld, worldToScreen, zoomAt, ZOOM_MAX,
} from '../../../app/utils/bench-view'
import { benchWarnings, DEFAULT_SHEET_MM, groupThousands, MIN_WEEDABLE_STROKE_MM } from '../../../app/utils/bench-warnings'
import { histogramHeights, histogramPath, inkShare, levelAfterKey, levelAt } from '../../../app/utils/bench-histogram'
import { parseOutlineSvg, tintedOutlineSvg } from '../../../app/utils/outline-svg'
import { changedShare, compareRows, defaultPair, diffMasks, overlayFrame } from '../../../app/utils/revision-compare'

const measurements = (over: Partial<Measurements> = {}): Measurements => ({
  widthMm: 150, heightMm: 100, inkAreaMm2: 4000, cutLengthMm: 900, pieces: 3, holes: 1, nodes: 120,
  narrowestFeatureMm: 4, smallPieces: 0, smallPieceLimitMm2: 1, fidelity: 0.995, threshold: 128,
  pxPerMm: 6, preparedWidthPx: 900, preparedHeightPx: 600, ...over,
})

describe('bench settings', () => {
  it('fills the server\'s defaults (shared/utils/settings.ts) for anything missing', () => {
    expect(normaliseSettings({})).toEqual(BENCH_DEFAULTS)
    expect(BENCH_DEFAULTS).toMatchObject({ speckFilterMm2: 0.5, cornerRounding: 1, curveTolerance: 0.2, luma: 'bt709', threshold: { mode: 'auto' } })
  })

  it('keeps stored values and clamps what is out of range', () => {
    const s = normaliseSettings({ threshold: { mode: 'manual', value: 300.4 }, cornerRounding: 9, speckFilterMm2: -1, crop: { x: 1.4, y: 2, width: 10, height: 20 } })
    expect(s.threshold).toEqual({ mode: 'manual', value: 255 })
    expect(s.cornerRounding).toBeCloseTo(4 / 3, 12)
    expect(s.speckFilterMm2).toBe(0)
    expect(s.crop).toEqual({ x: 1, y: 2, width: 10, height: 20 })
  })

  it('tells equal settings from changed ones, width included', () => {
    const a = normaliseSettings({ speckFilterMm2: 2 })
    expect(sameSettings(a, 100, normaliseSettings({ speckFilterMm2: 2 }), 100)).toBe(true)
    expect(sameSettings(a, 100, a, 101)).toBe(false)
    expect(sameSettings(a, 100, normaliseSettings({ speckFilterMm2: 2, swapInkAndPaper: true }), 100)).toBe(false)
  })

  it('lets the decal\'s height follow the drawing\'s width, with the margin on every side', () => {
    // the last run: a drawing 120 mm wide with 5 mm of margin came out 130 × 100 mm (ink 120 × 90)
    const known = { drawingWidthMm: 120, marginMm: 5, widthMm: 130, heightMm: 100 }
    expect(decalSizeMm(60, 0, known)).toEqual({ widthMm: 60, heightMm: 45 })
    expect(decalSizeMm(240, 2, known)).toEqual({ widthMm: 244, heightMm: 184 })
    expect(decalSizeMm(60, 0, null)).toBeNull()
  })
})

describe('zoom and pan kept in step', () => {
  const world = { width: 1200, height: 800 }
  const small = { width: 300, height: 200 }
  const wide = { width: 800, height: 200 }

  it('at zoom 1 every panel shows the whole source, centred', () => {
    const v = fitView(world)
    expect(worldToScreen({ x: 600, y: 400 }, v, small, world)).toEqual({ x: 150, y: 100 })
    expect(worldToScreen({ x: 600, y: 400 }, v, wide, world)).toEqual({ x: 400, y: 100 })
    const corner = worldToScreen({ x: 0, y: 0 }, v, wide, world)
    expect(corner.y).toBeCloseTo(0, 9) // height-limited: top edge at the top
  })

  it('screen ↔ world round-trips', () => {
    const v = { zoom: 3, cx: 400, cy: 300 }
    const p = { x: 37, y: 151 }
    const back = worldToScreen(screenToWorld(p, v, small, world), v, small, world)
    expect(back.x).toBeCloseTo(p.x, 9)
    expect(back.y).toBeCloseTo(p.y, 9)
  })

  it('wheel zoom keeps the point under the pointer still, and the other panel sees the same centre', () => {
    const v0 = fitView(world)
    const at = { x: 60, y: 40 }
    const under = screenToWorld(at, v0, small, world)
    const v1 = zoomAt(v0, 2, at, small, world)
    const still = worldToScreen(under, v1, small, world)
    expect(still.x).toBeCloseTo(at.x, 9)
    expect(still.y).toBeCloseTo(at.y, 9)
    // The other panel, of another size, centres on the same world point at the same zoom.
    const otherCentre = screenToWorld({ x: wide.width / 2, y: wide.height / 2 }, v1, wide, world)
    expect(otherCentre.x).toBeCloseTo(v1.cx, 9)
    expect(otherCentre.y).toBeCloseTo(v1.cy, 9)
  })

  it('dragging moves the picture with the pointer; arrow keys move by a tenth', () => {
    const v = { zoom: 2, cx: 600, cy: 400 }
    const moved = panByScreen(v, 30, 0, small, world)
    // scale = 0.25 × 2 = 0.5 screen px per world px, so 30 px is 60 world px
    expect(moved.cx).toBeCloseTo(540, 9)
    expect(panByStep(v, 1, 0, world).cx).toBeCloseTo(600 + 0.1 * 1200 / 2, 9)
  })

  it('keeps zoom and centre within bounds', () => {
    expect(clampView({ zoom: 1000, cx: -5, cy: 9000 }, world)).toEqual({ zoom: ZOOM_MAX, cx: 0, cy: 800 })
  })

  it('frames a rectangle', () => {
    const v = frameRect({ x: 0, y: 0, width: 300, height: 200 }, world, world)
    expect(v.cx).toBe(150)
    expect(v.cy).toBe(100)
    expect(v.zoom).toBeCloseTo(4 * 0.92, 9)
  })
})

describe('crop rectangle in source pixels', () => {
  const world = { width: 1200, height: 800 }
  it('spans the two points in whole pixels, outwards, inside the source', () => {
    expect(cropFromPoints({ x: 100.6, y: 50.2 }, { x: 20.3, y: 300.9 }, world)).toEqual({ x: 20, y: 50, width: 81, height: 251 })
    expect(cropFromPoints({ x: -40, y: -10 }, { x: 5000, y: 900 }, world)).toEqual({ x: 0, y: 0, width: 1200, height: 800 })
  })
  it('takes a tiny drag for a click', () => {
    expect(cropFromPoints({ x: 10, y: 10 }, { x: 12, y: 30 }, world)).toBeNull()
  })
  it('fits a typed-in crop inside the source', () => {
    expect(fitCrop({ x: 1100, y: -3, width: 500, height: 0 }, world)).toEqual({ x: 1100, y: 0, width: 100, height: 1 })
  })
})

describe('warnings in the trade\'s words', () => {
  it('says nothing about a clean, small, sturdy design', () => {
    expect(benchWarnings(measurements())).toEqual([])
  })

  it('names the setting that fixes each problem', () => {
    const w = benchWarnings(measurements({ smallPieces: 3, narrowestFeatureMm: 0.4, nodes: 24000, widthMm: 320, heightMm: 310, fidelity: 0.9 }))
    const byId = Object.fromEntries(w.map((x) => [x.id, x]))
    expect(byId['small-pieces']!.text).toBe('3 pieces are smaller than 1 mm² and will be lost when weeding — raise the speck filter')
    expect(byId['small-pieces']!.fix).toBe('speckFilterMm2')
    expect(byId['thin-stroke']!.text).toBe('The narrowest stroke is 0.4 mm; thin film tears below about 0.8 mm when weeding — thicken the thin strokes, or make the decal wider')
    // one click thickens to 0.8 mm, common practice when no film is chosen
    expect(byId['thin-stroke']!.oneClick).toEqual({ label: 'Thicken to 0.8 mm', settings: { thickenToMm: 0.8 } })
    expect(byId['thin-stroke']!.fix).toBe('thickenToMm')
    expect(byId['many-nodes']!.text).toBe('The outline has 24,000 nodes; the cut will stutter — raise the curve tolerance')
    expect(byId['many-nodes']!.fix).toBe('curveTolerance')
    expect(byId['too-wide']!.text).toBe('The design is 320 mm wide, wider than a 300 mm sheet — reduce the width')
    expect(byId['too-tall']!.fix).toBe('widthMm')
    expect(byId['low-fidelity']!.fix).toBe('curveTolerance')
    expect(DEFAULT_SHEET_MM).toEqual({ width: 300, height: 300 })
    expect(MIN_WEEDABLE_STROKE_MM).toBe(0.8)
  })

  it('checks against a chosen film\'s sheet and smallest weedable feature, by name', () => {
    const w = benchWarnings(measurements({ narrowestFeatureMm: 1.2, widthMm: 250 }), { sheetMm: { width: 200, height: 300 }, minStrokeMm: 1.5, filmName: 'Satin teal' })
    expect(w.map((x) => x.text)).toEqual([
      'The narrowest stroke is 1.2 mm; Satin teal tears below about 1.5 mm when weeding — thicken the thin strokes, or make the decal wider',
      'The design is 250 mm wide, wider than the 200 mm sheet of Satin teal — reduce the width',
    ])
    // the film's own smallest weedable feature is what one click thickens to
    expect(w[0]!.oneClick).toEqual({ label: 'Thicken to 1.5 mm', settings: { thickenToMm: 1.5 } })
    expect(w[1]!.oneClick).toBeUndefined()
  })

  it('one small piece is "a piece", and an empty outline points at the threshold', () => {
    expect(benchWarnings(measurements({ smallPieces: 1 }))[0]!.text).toMatch(/^1 piece is smaller/)
    const empty = benchWarnings(measurements({ pieces: 0, narrowestFeatureMm: null }))
    expect(empty.map((w) => w.fix)).toEqual(['threshold'])
  })

  it('groups thousands with a space', () => {
    expect(groupThousands(24000)).toBe('24,000')
    expect(groupThousands(1234567)).toBe('1,234,567')
    expect(groupThousands(999)).toBe('999')
  })
})

describe('the histogram', () => {
  it('draws on a square-root scale, and a bin of a few pixels still shows beside a million', () => {
    const counts = new Array(256).fill(0)
    counts[20] = 5
    counts[110] = 40_000
    counts[240] = 1_000_000
    const h = histogramHeights(counts, 100)
    expect(h[240]).toBe(100)
    expect(h[110]).toBeCloseTo(20, 9) // √40 000 / √1 000 000 = 0.2, where a straight scale gives 4
    expect(h[20]).toBe(1) // at least one unit tall
    expect(h[100]).toBe(0)
    expect(histogramPath(counts, 100)).toMatch(/^M20 100v-/)
  })

  it('reads levels from the pointer and the keys', () => {
    expect(levelAt(0, 512)).toBe(0)
    expect(levelAt(511.9, 512)).toBe(255)
    expect(levelAt(256, 512)).toBe(128)
    expect(levelAt(-5, 512)).toBe(0)
    expect(levelAfterKey('ArrowRight', 254)).toBe(255)
    expect(levelAfterKey('ArrowRight', 255)).toBe(255)
    expect(levelAfterKey('PageDown', 5)).toBe(0)
    expect(levelAfterKey('Home', 99)).toBe(0)
    expect(levelAfterKey('End', 99)).toBe(255)
    expect(levelAfterKey('a', 99)).toBeNull()
    // Shift with an arrow is a larger step, as Page Up and Page Down are.
    expect(levelAfterKey('ArrowRight', 100, true)).toBe(110)
    expect(levelAfterKey('ArrowDown', 5, true)).toBe(0)
    expect(levelAfterKey('PageUp', 100)).toBe(levelAfterKey('ArrowUp', 100, true))
  })

  it('tells what share becomes ink', () => {
    const counts = new Array(256).fill(0)
    counts[10] = 1
    counts[200] = 3
    expect(inkShare(counts, 100)).toBe(0.25)
    expect(inkShare(counts, 200)).toBe(1)
  })
})

describe('reading our clean vector', () => {
  const svg = '<svg xmlns="http://www.w3.org/2000/svg" width="120mm" height="80mm" viewBox="0 0 120 80"><path fill-rule="evenodd" d="M10 10h20v20H10z"/><path d=\'M1 1h2v2z\'/></svg>'
  it('finds the size in mm, the viewBox and every path', () => {
    const o = parseOutlineSvg(svg)!
    expect(o.widthMm).toBe(120)
    expect(o.heightMm).toBe(80)
    expect(o.viewBox).toEqual([0, 0, 120, 80])
    expect(o.paths).toEqual(['M10 10h20v20H10z', 'M1 1h2v2z'])
  })
  it('makes a tinted copy for the canvas', () => {
    const t = tintedOutlineSvg(parseOutlineSvg(svg)!, '#000', 300, 200)
    expect(t).toContain('width="300" height="200" viewBox="0 0 120 80"')
    expect(t).toContain('fill-rule="evenodd"')
  })
  it('answers null for what is not an SVG', () => {
    expect(parseOutlineSvg('not svg')).toBeNull()
  })
})

describe('comparing two revisions', () => {
  it('lists every setting and measurement, marking what changed', () => {
    const rows = compareRows(
      { number: 1, widthMm: 150, settings: {}, measurements: measurements() },
      { number: 2, widthMm: 150, settings: { speckFilterMm2: 3, threshold: { mode: 'manual', value: 70 } }, measurements: measurements({ pieces: 2 }) },
    )
    const changed = rows.filter((r) => r.changed).map((r) => `${r.group}:${r.key}`)
    expect(changed).toEqual(['setting:threshold', 'setting:speckFilterMm2', 'measurement:pieces'])
    const speck = rows.find((r) => r.key === 'speckFilterMm2')!
    expect([speck.label, speck.a, speck.b]).toEqual(['Speck filter', '0.5 mm²', '3 mm²'])
    expect(rows.find((r) => r.key === 'threshold' && r.group === 'setting')!.b).toBe('Manual, 70')
  })

  it('classifies pixels into only-in-A, only-in-B and in both', () => {
    const px = (alphas: number[]) => new Uint8ClampedArray(alphas.flatMap((a) => [0, 0, 0, a]))
    const a = px([255, 255, 0, 0])
    const b = px([255, 0, 255, 0])
    const d = diffMasks(a, b, 2, 2, { onlyA: [1, 1, 1], onlyAStripe: [2, 2, 2], onlyB: [3, 3, 3], both: [4, 4, 4] })
    expect([d.both, d.onlyA, d.onlyB]).toEqual([1, 1, 1])
    expect(Array.from(d.image.slice(0, 4))).toEqual([4, 4, 4, 255])
    expect(Array.from(d.image.slice(8, 12))).toEqual([3, 3, 3, 255])
    expect(d.image[15]).toBe(0) // neither: transparent
    expect(changedShare(d)).toBeCloseTo(2 / 3, 12)
  })

  it('lays two trimmed drawings at the same width, as tall as the taller needs', () => {
    expect(overlayFrame([{ widthMm: 120, heightMm: 90 }, { widthMm: 60, heightMm: 50 }], 1000)).toEqual({ width: 1000, height: 833 })
  })

  it('picks a sensible pair when the address names none or only one', () => {
    expect(defaultPair([3, 2, 1])).toEqual({ a: 2, b: 3 })
    expect(defaultPair([3, 2, 1], 1)).toEqual({ a: 1, b: 3 })
    expect(defaultPair([3, 2, 1], undefined, 2)).toEqual({ a: 1, b: 2 })
    expect(defaultPair([3, 2, 1], 9, 9)).toEqual({ a: 2, b: 3 })
    expect(defaultPair([1])).toEqual({ a: null, b: 1 })
  })
})
