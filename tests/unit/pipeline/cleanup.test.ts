// The automatic clean-up's contract: trimming to the drawing, choices that can be pinned,
// refusals of what cannot become a decal, and the plain modules it is made of.
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { chroma, colourName, densityDirection, densityGrey, estimatePaperColour, orthonormal, type Rgb } from '../../../server/pipeline/colour'
import { NotADrawingError } from '../../../server/pipeline/errors'
import { findPaperLines, removeLines } from '../../../server/pipeline/lines'
import { toGrey } from '../../../server/pipeline/luma'
import { prepareBitmap, prepareDrawing } from '../../../server/pipeline/prepare'
import { runPipeline } from '../../../server/pipeline/run'
import { findSheet, sheetAspect, type Quad } from '../../../server/pipeline/sheet'
import work from '../../../server/pipeline/worker'
import { parseSettings, scaleSourceGeometry } from '../../../shared/utils/settings'
import { gridBlue } from './hard-cases'
import { gaussian, mulberry32, referenceNarrowest, svgDoc, svgToPng } from './helpers'

/** 400 × 300 white image with a black 200 × 200 square (x 50…249, y 40…239). */
const MARKER = svgDoc(400, 300, '<rect x="50" y="40" width="200" height="200"/>')

async function refusal(source: Buffer, widthMm = 100): Promise<NotADrawingError> {
  const err = await runPipeline({ source: new Uint8Array(source), settings: {}, widthMm, purpose: 'revision' }).catch((e: unknown) => e)
  expect(err).toBeInstanceOf(NotADrawingError)
  return err as NotADrawingError
}

async function rgbPng(w: number, h: number, f: (x: number, y: number) => number): Promise<Buffer> {
  const raw = Buffer.alloc(w * h * 3)
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) raw.fill(Math.max(0, Math.min(255, Math.round(f(x, y)))), (y * w + x) * 3, (y * w + x) * 3 + 3)
  return sharp(raw, { raw: { width: w, height: h, channels: 3 } }).png().toBuffer()
}

describe('trim to the drawing', () => {
  it('the requested width is the drawing\'s; the margin is added around it', async () => {
    const png = await svgToPng(MARKER)
    const p = await prepareDrawing(png, {}, 20)
    // the 200 px square is the drawing: 20 mm wide at 10 px/mm, as drawn
    expect([p.width, p.height]).toEqual([200, 200])
    expect(p.widthMm).toBe(20)
    expect(p.pxPerMm).toBe(10)
    expect(p.bitmap.every((v) => v === 1)).toBe(true)
    const m = await prepareDrawing(png, { marginMm: 2 }, 20)
    expect([m.width, m.height]).toEqual([240, 240]) // 20 px of paper on each side
    expect(m.widthMm).toBe(24)
    expect(m.bitmap[0]).toBe(0)
    expect(m.choices.find((c) => c.setting === 'marginMm')!.reason).toMatch(/20\.0 × 20\.0 mm, with 2\.0 mm of paper/)
  })

  it('the clean vector and the measurements follow the drawing\'s size', async () => {
    const source = new Uint8Array(await svgToPng(MARKER))
    const r = await runPipeline({ source, settings: {}, widthMm: 20, purpose: 'revision' })
    expect(r.cleanSvg).toMatch(/width="20mm"/)
    expect(r.cleanSvg).toMatch(/height="20mm"/)
    expect(r.measurements.widthMm).toBe(20)
    expect(r.measurements.heightMm).toBe(20)
    // With paper around it (ink off the bitmap's edges), the ink is the 20 × 20 mm square.
    const framed = await runPipeline({ source, settings: { marginMm: 1 }, widthMm: 20, purpose: 'revision' })
    expect(Math.abs(framed.measurements.widthMm - 22)).toBeLessThan(0.2)
    expect(framed.measurements.inkAreaMm2).toBeCloseTo(400, -1)
    expect(Math.abs(framed.measurements.inkAreaMm2 / 400 - 1)).toBeLessThan(0.01)
    expect(r.choices.map((c) => c.setting)).toEqual(['corners', 'lightingEvening', 'inkColour', 'dropoutColour', 'paperLines', 'threshold', 'thickenToMm', 'marginMm'])
  })

  it('the whole frame is kept by prepareBitmap (the width is the frame\'s)', async () => {
    const p = await prepareBitmap(await svgToPng(MARKER), {}, 40)
    expect([p.width, p.height]).toEqual([400, 300])
  })
})

describe('automatic is a setting like any other', () => {
  it('writing back every choice the analysis made gives the same prepared bitmap', async () => {
    const c = await gridBlue()
    const auto = await prepareDrawing(c.source, {}, c.widthMm)
    const pinned = Object.fromEntries(auto.choices.filter((x) => x.setting !== 'marginMm').map((x) => [x.setting, x.value]))
    const again = await prepareDrawing(c.source, pinned, c.widthMm)
    expect(Buffer.from(again.bitmap).equals(Buffer.from(auto.bitmap))).toBe(true)
    expect(again.choices.every((x) => !x.automatic)).toBe(true)
    // and a pinned choice overrides the analysis
    const kept = await prepareDrawing(c.source, { dropoutColour: { mode: 'none' }, paperLines: 'keep' }, c.widthMm)
    let more = 0
    for (let i = 0; i < kept.bitmap.length; i++) more += kept.bitmap[i]!
    expect(kept.choices.find((x) => x.setting === 'paperLines')!.reason).toMatch(/kept, as set/)
    expect(more).toBeGreaterThan(auto.bitmap.reduce((a, b) => a + b, 0) * 1.5) // the grid is back
  })

  it('crop and corners follow a shrunk preview source', () => {
    const s = parseSettings({ crop: { x: 100, y: 40, width: 1000, height: 800 }, corners: { mode: 'manual', points: [{ x: 0, y: 0 }, { x: 1000, y: 10 }, { x: 990, y: 700 }, { x: 5, y: 690 }] } })
    const half = scaleSourceGeometry(s, 0.5, 640, 480)
    expect(half.crop).toEqual({ x: 50, y: 20, width: 500, height: 400 })
    expect(half.corners).toEqual({ mode: 'manual', points: [{ x: 0, y: 0 }, { x: 500, y: 5 }, { x: 495, y: 350 }, { x: 2.5, y: 345 }] })
    expect(scaleSourceGeometry(s, 1, 640, 480)).toBe(s)
  })
})

describe('a faint drawing of solid shapes (a washed-out photo)', () => {
  // Mid-grey ink on light grey paper, 36 % darker: faint by the analysis' measure. A disc of
  // radius 150 px and a 500 × 60 px bar, 900 px across at 90 mm: 10 px/mm, so the ink is
  // π·15² + 50·6 = 1006.9 mm² (handbook geometry).
  const shapes = (body: string) => svgDoc(1200, 800, `<rect width="1200" height="800" fill="#f2f2f2"/>${body}`)
  const AREA_MM2 = Math.PI * 15 * 15 + 50 * 6

  it('keeps its shapes filled with one level, where a level for every spot would hollow them out', async () => {
    const source = await svgToPng(shapes('<g fill="#9a9a9a"><circle cx="300" cy="400" r="150"/><rect x="550" y="370" width="500" height="60"/></g>'))
    const r = await runPipeline({ source, settings: {}, widthMm: 90, purpose: 'revision' })
    const t = r.choices.find((c) => c.setting === 'threshold')!
    expect(t).toMatchObject({ automatic: true, value: { mode: 'otsu' }, reason: expect.stringMatching(/^The drawing is faint .* but its shapes are solid, which a threshold for every spot would hollow out/) })
    expect(Math.abs(r.measurements.inkAreaMm2 / AREA_MM2 - 1)).toBeLessThan(0.015)
    expect([r.measurements.pieces, r.measurements.holes]).toEqual([2, 0])
  })

  it('still reads faint lines, which have no bodies to hollow, with a level for every spot', async () => {
    const source = await svgToPng(shapes('<g fill="none" stroke="#9a9a9a" stroke-width="4"><circle cx="300" cy="400" r="150"/><path d="M550 400h500"/></g>'))
    const r = await runPipeline({ source, settings: {}, widthMm: 90, purpose: 'revision' })
    expect(r.choices.find((c) => c.setting === 'threshold')!.value).toMatchObject({ mode: 'adaptive' })
  })
})

describe('a light drawing on a dark page', () => {
  // A light disc (radius 150 px) and bar (500 × 60 px) on a dark page: 900 px across at 100 mm,
  // 9 px/mm, so π·(150/9)² + (500/9)·(60/9) mm² of ink (handbook geometry).
  const page = (ink: string, paper: string) => svgToPng(svgDoc(1200, 800, `<rect width="1200" height="800" fill="${paper}"/><g fill="${ink}"><circle cx="300" cy="400" r="150"/><rect x="550" y="370" width="500" height="60"/></g>`))
  const AREA_MM2 = Math.PI * (150 / 9) ** 2 + (500 / 9) * (60 / 9)
  const reasonOf = (r: Awaited<ReturnType<typeof runPipeline>>, setting: string) => r.choices.find((c) => c.setting === setting)!.reason

  it('says it may be light on dark, and with ink and paper swapped comes out as the shapes', async () => {
    const source = await page('#eeeeee', '#151515')
    const asIs = await runPipeline({ source, settings: {}, widthMm: 100, purpose: 'revision' })
    expect(reasonOf(asIs, 'threshold')).toMatch(/Most of the picture is dark, right up to its edges: if the drawing is light on a dark background, swap ink and paper/)
    const swapped = await runPipeline({ source, settings: { swapInkAndPaper: true }, widthMm: 100, purpose: 'revision' })
    expect([swapped.measurements.pieces, swapped.measurements.holes]).toEqual([2, 0])
    expect(Math.abs(swapped.measurements.inkAreaMm2 / AREA_MM2 - 1)).toBeLessThan(0.015)
    expect(reasonOf(swapped, 'lightingEvening')).toMatch(/^Ink and paper are swapped .* lighting evening, which takes the light part for the paper, is off\.$/)
    expect(reasonOf(swapped, 'threshold')).not.toMatch(/Most of the picture is dark/)
  })

  it('says nothing of the kind for dark shapes on a light page', async () => {
    const r = await runPipeline({ source: await page('#151515', '#f5f5f0'), settings: {}, widthMm: 100, purpose: 'revision' })
    expect(reasonOf(r, 'threshold')).not.toMatch(/Most of the picture is dark/)
    expect(Math.abs(r.measurements.inkAreaMm2 / AREA_MM2 - 1)).toBeLessThan(0.015)
  })
})

describe('a threshold set by hand that breaks the strokes into crumbs', () => {
  it('is refused, and the sentence says to raise it', async () => {
    // The pencil on blue grid paper at a manual threshold of 120: most of its ink falls apart
    // into pieces under the speck filter (at 160 it holds together: see the next test).
    const c = await gridBlue()
    await expect(prepareDrawing(c.source, { threshold: { mode: 'manual', value: 120 } }, c.widthMm)).rejects.toMatchObject({
      reason: 'specks', message: expect.stringMatching(/of the drawing's ink is in pieces smaller than the speck filter \(0\.5 mm²\), which the decal would leave out\. Raise the threshold so the strokes hold together/),
    })
  })
})

describe('previews of one source', () => {
  it('reuse the sheet\'s reading while only the threshold or the outline changes, with the same result', async () => {
    const c = await gridBlue()
    const settings = [{}, { threshold: { mode: 'manual' as const, value: 160 } }, { cornerRounding: 0.4, speckFilterMm2: 2 }, { paperLines: 'keep' as const }]
    for (const [i, s] of settings.entries()) {
      const fresh = await prepareDrawing(c.source, s, c.widthMm)
      const kept = await prepareDrawing(c.source, s, c.widthMm, { sourceKey: 'grid' })
      expect(Buffer.from(kept.bitmap).equals(Buffer.from(fresh.bitmap)), `settings ${i}`).toBe(true)
      expect(kept.choices).toEqual(fresh.choices)
      // after the first, the reading came from the earlier run (no analysis of the paper)
      if (i === 1 || i === 2) expect(kept.timings.analysisSteps.paper).toBe(0)
    }
  })
})

describe('thin strokes made weedable', () => {
  // A pencil line drawing 120 mm wide: strokes of 0.3 mm, a hook of 0.25 mm, a 1 mm dot (above
  // the speck filter) and a disc.
  const PENCIL = svgDoc(1300, 900, '<g fill="none" stroke="#222"><path d="M50 850 L50 50 L1250 50" stroke-width="2.5"/>'
    + '<path d="M200 700 C400 150 800 900 1100 250" stroke-width="3"/><path d="M250 300 L650 240" stroke-width="3"/></g>'
    + '<circle cx="900" cy="650" r="5" fill="#222"/><circle cx="500" cy="550" r="90" fill="#222"/>')

  it('thickens every stroke of the decal to at least the asked width, and says so', async () => {
    const source = new Uint8Array(await svgToPng(PENCIL))
    const thin = await runPipeline({ source, settings: {}, widthMm: 120, purpose: 'revision' })
    expect(thin.measurements.narrowestFeatureMm!).toBeLessThan(0.45)
    const thick = await runPipeline({ source, settings: { thickenToMm: 0.8 }, widthMm: 120, purpose: 'revision' })
    const m = thick.measurements
    // the drawing keeps its width: the ink is trimmed again after thickening
    expect(m.widthMm).toBeCloseTo(120, 6)
    // Measured on what will be cut, the clean vector rasterised back: at least the asked width.
    expect(m.narrowestFeatureMm!).toBeGreaterThanOrEqual(0.8)
    // and at preview resolution too, where a pixel is a sixth of a millimetre
    const preview = await runPipeline({ source, settings: { thickenToMm: 0.8 }, widthMm: 120, purpose: 'preview' })
    expect(preview.measurements.narrowestFeatureMm!).toBeGreaterThanOrEqual(0.8)
    expect(m.pieces).toBe(thin.measurements.pieces)
    // the strokes are over 250 mm long in all, and at least 0.4 mm wider
    expect(m.inkAreaMm2 - thin.measurements.inkAreaMm2).toBeGreaterThan(0.4 * 250)
    expect(thick.choices.find((c) => c.setting === 'thickenToMm')).toMatchObject({ automatic: false, value: 0.8, reason: expect.stringMatching(/narrower than 0\.8 mm are thickened/) })
    expect(thin.choices.find((c) => c.setting === 'thickenToMm')).toMatchObject({ value: null, reason: 'Strokes are kept as drawn.' })

    // Reference: scikit-image's medial axis and SciPy's distance transform on the prepared
    // bitmap (reference/narrowest.py, Debian python3-skimage): at least the asked width.
    const prepared = await prepareDrawing(source, { thickenToMm: 0.8 }, 120)
    const [ref] = referenceNarrowest([prepared])
    expect(ref!.widthPx! / prepared.pxPerMm).toBeGreaterThanOrEqual(0.8)
  })
})

describe('not a drawing: a clear refusal', () => {
  it('a 1 × 1 image', async () => {
    const err = await refusal(await rgbPng(1, 1, () => 0))
    expect(err.reason).toBe('too-small')
    expect(err.message).toMatch(/only 1 × 1 pixels/)
  })

  it('a blank page, unevenly lit and noisy', async () => {
    const rnd = mulberry32(3)
    const err = await refusal(await rgbPng(400, 300, (x, y) => 235 - 40 * (x / 400) * (y / 300) + 3 * gaussian(rnd)))
    expect(err.reason).toBe('blank')
    expect(err.message).toMatch(/No drawing was found/)
  })

  it('everything ink', async () => {
    const rnd = mulberry32(4)
    const err = await refusal(await rgbPng(300, 200, () => 12 + 4 * rnd()))
    expect(err.reason).toBe('all-ink')
    const black = await refusal(await svgToPng(svgDoc(300, 200, '<rect width="300" height="200"/><rect x="0" y="0" width="2" height="2" fill="#fff"/>')))
    expect(black.reason).toBe('all-ink')
    expect(black.message).toMatch(/swap ink and paper/)
  })

  it('most pieces too small to weed', async () => {
    // a scatter of dots of about 0.7 mm² at the decal's size (590 px across for 100 mm: over
    // the 0.5 mm² speck filter, under the 1 mm² a piece needs to survive weeding)
    const rnd = mulberry32(9)
    let dots = '<rect x="5" y="5" width="6" height="6"/><rect x="589" y="389" width="6" height="6"/>'
    for (let i = 0; i < 120; i++) dots += `<rect x="${(20 + rnd() * 560).toFixed(0)}" y="${(20 + rnd() * 360).toFixed(0)}" width="5" height="5"/>`
    const err = await refusal(await svgToPng(svgDoc(600, 400, dots)), 100)
    expect(err.reason).toBe('specks')
    expect(err.message).toMatch(/would be lost when weeding/)
  })

  it('crosses the worker thread as its own kind', async () => {
    const answer = await work({ source: new Uint8Array(await rgbPng(1, 1, () => 0)), settings: {}, widthMm: 10, purpose: 'preview' })
    expect(answer).toMatchObject({ ok: false, kind: 'not-a-drawing' })
  })
})

describe('colour', () => {
  it('a yellow marker reads as ink by density, where luma nearly loses it', () => {
    const paper = estimatePaperColour(new Uint8Array([250, 248, 240, 250, 248, 240, 250, 248, 240]), 3, 'bt709')
    const yellow = new Uint8Array([244, 210, 28])
    const byDensity = densityGrey(yellow, 1, { paper, paperLuma: null, dropped: [] })[0]!
    const byLuma = toGrey(yellow, 1, 1, 3, 'bt709')[0]!
    expect(byLuma).toBeGreaterThan(200) // ITU-R BT.709 luma of this yellow: 0.2126·244 + 0.7152·210 + 0.0722·28
    expect(byDensity).toBeLessThan(40) // 255 · exp(−ln(240/28)): the blue channel, absorbed
    expect(colourName([244, 210, 28])).toBe('yellow')
    expect(colourName([128, 128, 130])).toBe('grey')
    expect(chroma(0.1, 0.1, 2)).toBeGreaterThan(0.9)
  })

  it('dropping a colour takes out lines of it, and keeps grey ink over them', () => {
    const paper = estimatePaperColour(new Uint8Array([248, 248, 245]), 1, 'bt709')
    const blue: Rgb = [140, 180, 228]
    const dir = densityDirection(blue, paper)!
    const drop = orthonormal([dir])
    // Densities of layers add: grey pencil (×0.45 in each channel) over the blue line.
    const pencil: Rgb = [0.45 * 248, 0.45 * 248, 0.45 * 245]
    const over: Rgb = [blue[0] * 0.45, blue[1] * 0.45, blue[2] * 0.45 * 245 / 245]
    const px = new Uint8Array([...blue, ...pencil, ...over].map(Math.round))
    const g = densityGrey(px, 3, { paper, paperLuma: null, dropped: drop })
    expect(g[0]).toBeGreaterThan(245) // the line: paper
    expect(Math.abs(g[1]! - g[2]!)).toBeLessThanOrEqual(3) // pencil reads the same over the line as beside it
    expect(g[1]).toBeLessThan(200)
  })
})

describe('paper lines', () => {
  it('finds a slightly skewed grid, its spacing and slope, and takes it out but not the strokes', async () => {
    // 4 px lines every 30 px, turned by 1°; a thick stroke across them, one lying along a line.
    const w = 600, h = 450, deg = 1
    let body = `<g transform="rotate(${deg} 300 225)">`
    for (let y = -60; y < h + 60; y += 30) body += `<rect x="-60" y="${y}" width="${w + 120}" height="2" fill="#777"/>`
    for (let x = -60; x < w + 60; x += 30) body += `<rect x="${x}" y="-60" width="2" height="${h + 120}" fill="#777"/>`
    body += '</g><path d="M80 80 L520 380" stroke="#000" stroke-width="12"/><rect x="100" y="330" width="300" height="10"/>'
    const png = await svgToPng(svgDoc(w, h, body))
    const { data } = await sharp(png).greyscale().raw().toBuffer({ resolveWithObject: true })
    const darkness = Uint8Array.from(data, (v) => 255 - v)
    const families = findPaperLines(darkness, w, h).filter((f) => f.regular)
    expect(families.map((f) => f.orientation).sort()).toEqual(['horizontal', 'vertical'])
    for (const f of families) {
      expect(Math.abs(f.period - 30)).toBeLessThan(0.3)
      expect(Math.abs(Math.atan(f.slope) * 180 / Math.PI - (f.orientation === 'horizontal' ? deg : -deg))).toBeLessThanOrEqual(0.15)
      expect(f.offsets.length).toBeGreaterThanOrEqual(13)
    }
    const bm = Uint8Array.from(data, (v) => (v < 160 ? 1 : 0))
    for (const f of families) removeLines(bm, w, h, f)
    // the diagonal stroke is whole, the bar along a line is whole, the grid is gone
    const at = (x: number, y: number) => bm[y * w + x]
    expect(at(300, 230)).toBe(1) // on the diagonal, near a crossing
    let bar = 0
    for (let x = 110; x < 390; x++) for (let y = 331; y < 339; y++) bar += at(x, y)!
    expect(bar).toBeGreaterThan(0.97 * 280 * 8)
    let left = 0
    for (let y = 0; y < 60; y++) for (let x = 450; x < w; x++) left += at(x, y)!
    expect(left).toBeLessThan(40)
  })
})

describe('the sheet', () => {
  it('finds a sheet\'s corners on a dark table to a fraction of a pixel', async () => {
    const q: Quad = [{ x: 130.5, y: 90.25 }, { x: 640.75, y: 140.5 }, { x: 600.25, y: 520.75 }, { x: 95.5, y: 480.5 }]
    const png = await svgToPng(`<svg xmlns="http://www.w3.org/2000/svg" width="760" height="600"><rect width="760" height="600" fill="#4a4038"/>
      <path d="M${q.map((p) => `${p.x} ${p.y}`).join(' L')} Z" fill="#f1efe8"/><circle cx="380" cy="300" r="60" fill="#222"/></svg>`)
    const { data, info } = await sharp(png).greyscale().raw().toBuffer({ resolveWithObject: true })
    const found = findSheet(new Uint8Array(data), info.width, info.height)!
    for (let i = 0; i < 4; i++) expect(Math.hypot(found.corners[i]!.x - q[i]!.x, found.corners[i]!.y - q[i]!.y)).toBeLessThan(0.5)
    // a page that fills the picture has no corners to find
    const page = await sharp({ create: { width: 300, height: 200, channels: 3, background: '#f4f4f0' } }).raw().toBuffer()
    expect(findSheet(toGrey(page, 300, 200, 3, 'bt709'), 300, 200)).toBeNull()
  })

  it('a rectangle seen square-on keeps its proportions', () => {
    const q: Quad = [{ x: 100, y: 100 }, { x: 400, y: 100 }, { x: 400, y: 300 }, { x: 100, y: 300 }]
    expect(sheetAspect(q, 250, 200, 500).aspect).toBeCloseTo(1.5, 9)
  })
})
