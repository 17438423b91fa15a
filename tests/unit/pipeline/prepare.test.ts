import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { NotADrawingError, PrepareError } from '../../../server/pipeline/errors'
import { CLEAR_SHARE, prepareBitmap, prepareDrawing, SPECK_INK_LIMIT } from '../../../server/pipeline/prepare'
import { DEFAULT_SETTINGS, parseSettings } from '../../../shared/utils/settings'

/** 200 × 100 white image with a black 40 × 40 square at the top left (x 10…49, y 10…49). */
async function marker(): Promise<Buffer> {
  const raw = Buffer.alloc(200 * 100 * 3, 255)
  for (let y = 10; y < 50; y++) for (let x = 10; x < 50; x++) raw.fill(0, (y * 200 + x) * 3, (y * 200 + x) * 3 + 3)
  return sharp(raw, { raw: { width: 200, height: 100, channels: 3 } }).png().toBuffer()
}

function inkBox(bm: Uint8Array, w: number, h: number) {
  let x0 = w, y0 = h, x1 = -1, y1 = -1
  for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) if (bm[y * w + x]) { x0 = Math.min(x0, x); y0 = Math.min(y0, y); x1 = Math.max(x1, x); y1 = Math.max(y1, y) }
  return { x0, y0, x1, y1 }
}

describe('settings', () => {
  it('has the documented defaults and validates', () => {
    expect(DEFAULT_SETTINGS).toEqual({
      luma: 'bt709',
      corners: { mode: 'auto' },
      quarterTurns: 0,
      fineAngleDeg: 0,
      lightingEvening: { mode: 'auto', strength: 1 },
      inkColour: 'auto',
      dropoutColour: { mode: 'auto' },
      paperLines: 'auto',
      threshold: { mode: 'auto' },
      swapInkAndPaper: false,
      crop: null,
      marginMm: 0,
      thickenToMm: null,
      speckFilterMm2: 0.5,
      cornerRounding: 1,
      curveTolerance: 0.2,
    })
    // Settings stored before evening could be automatic still read as they were meant.
    expect(parseSettings({ lightingEvening: { enabled: true, strength: 0.7 } }).lightingEvening).toEqual({ mode: 'on', strength: 0.7 })
    expect(parseSettings({ lightingEvening: { enabled: false } }).lightingEvening).toEqual({ mode: 'off', strength: 1 })
    expect(parseSettings({ threshold: { mode: 'adaptive' } }).threshold).toEqual({ mode: 'adaptive', windowMm: 8, k: 0.2, r: 127.5 })
    expect(() => parseSettings({ dropoutColour: { mode: 'colours', colours: ['blue'] } })).toThrow()
    expect(() => parseSettings({ corners: { mode: 'manual', points: [{ x: 0, y: 0 }] } })).toThrow()
    expect(() => parseSettings({ threshold: { mode: 'manual', value: 300 } })).toThrow()
    expect(() => parseSettings({ cornerRounding: 2 })).toThrow()
    expect(() => parseSettings({ thickenToMm: 0 })).toThrow()
    expect(parseSettings({ thickenToMm: 0.8 }).thickenToMm).toBe(0.8)
    expect(parseSettings({ cornerRounding: 4 / 3 }).cornerRounding).toBeCloseTo(1.3333, 4)
  })
})

describe('prepareBitmap', () => {
  it('thresholds, keeps size at 10 px/mm and writes a black-on-white PNG', async () => {
    const prep = await prepareBitmap(await marker(), {}, 20)
    expect([prep.width, prep.height, prep.pxPerMm]).toEqual([200, 100, 10])
    expect(prep.heightMm).toBe(10)
    expect(inkBox(prep.bitmap, 200, 100)).toEqual({ x0: 10, y0: 10, x1: 49, y1: 49 })
    expect(prep.histogram.reduce((a, b) => a + b, 0)).toBe(200 * 100)
    expect(prep.threshold).toBeGreaterThanOrEqual(0)
    expect(prep.threshold).toBeLessThan(255)
    // PNG read back: black ink, white paper, same pixels
    const { data, info } = await sharp(prep.png).greyscale().raw().toBuffer({ resolveWithObject: true })
    expect([info.width, info.height]).toEqual([200, 100])
    for (let i = 0; i < prep.bitmap.length; i++) if ((data[i * info.channels]! < 128 ? 1 : 0) !== prep.bitmap[i]) throw new Error(`PNG differs at ${i}`)
    const meta = await sharp(prep.png).metadata()
    expect(meta.format).toBe('png')
    expect(meta.isPalette).toBe(true) // 2-colour palette
  })

  it('swaps ink and paper', async () => {
    const prep = await prepareBitmap(await marker(), { swapInkAndPaper: true }, 20)
    expect(prep.bitmap[0]).toBe(1)
    expect(prep.bitmap[20 * 200 + 20]).toBe(0)
  })

  it('applies a manual threshold with ink = grey <= threshold', async () => {
    const raw = Buffer.from([100, 100, 100, 101, 101, 101])
    const png = await sharp(raw, { raw: { width: 2, height: 1, channels: 3 } }).png().toBuffer()
    const prep = await prepareBitmap(png, { threshold: { mode: 'manual', value: 100 } }, 0.2)
    expect([...prep.bitmap]).toEqual([1, 0])
  })

  it('resamples to the prepared size', async () => {
    // 200 px across at 100 mm is 2 px/mm: enlarged 4× (the cap on enlargement) to 800 px
    const prep = await prepareBitmap(await marker(), {}, 100)
    expect([prep.width, prep.height]).toEqual([800, 400])
    expect(prep.pxPerMm).toBe(8)
    const box = inkBox(prep.bitmap, 800, 400)
    expect(Math.abs(box.x0 - 40)).toBeLessThanOrEqual(1)
    expect(Math.abs(box.x1 - 199)).toBeLessThanOrEqual(1)
  })

  it('turns the source upright by its orientation tag, then crops in upright pixels', async () => {
    // Exif Orientation 6: the stored image must be turned 90° clockwise to be viewed
    // (Exif 2.3, JEITA CP-3451, tag 0x0112 — from memory).
    const jpeg = await sharp(await marker()).jpeg({ quality: 95 }).withMetadata({ orientation: 6 }).toBuffer()
    const prep = await prepareBitmap(jpeg, {}, 10)
    expect([prep.width, prep.height]).toEqual([100, 200])
    // top-left square (x 10…49, y 10…49 stored) → after a quarter turn clockwise: x 50…89, y 10…49
    const box = inkBox(prep.bitmap, 100, 200)
    expect(Math.abs(box.x0 - 50)).toBeLessThanOrEqual(1)
    expect(Math.abs(box.x1 - 89)).toBeLessThanOrEqual(1)
    expect(Math.abs(box.y0 - 10)).toBeLessThanOrEqual(1)
    expect(Math.abs(box.y1 - 49)).toBeLessThanOrEqual(1)
    // crop in upright pixels: the right half of the upright image contains the square
    const cropped = await prepareBitmap(jpeg, { crop: { x: 40, y: 0, width: 60, height: 80 } }, 6)
    expect([cropped.width, cropped.height]).toEqual([60, 80])
    const cb = inkBox(cropped.bitmap, 60, 80)
    expect(Math.abs(cb.x0 - 10)).toBeLessThanOrEqual(1)
    expect(Math.abs(cb.y0 - 10)).toBeLessThanOrEqual(1)
    await expect(prepareBitmap(jpeg, { crop: { x: 50, y: 0, width: 60, height: 10 } }, 6)).rejects.toBeInstanceOf(PrepareError)
  })

  it('reads the first frame of an animated GIF', async () => {
    // frame 1: square on the left; frame 2: square on the right
    const w = 60, h = 60
    const raw = Buffer.alloc(w * h * 2 * 3, 255)
    for (let y = 10; y < 30; y++) {
      for (let x = 5; x < 25; x++) raw.fill(0, (y * w + x) * 3, (y * w + x) * 3 + 3)
      for (let x = 35; x < 55; x++) raw.fill(0, ((y + h) * w + x) * 3, ((y + h) * w + x) * 3 + 3)
    }
    const gif = await sharp(raw, { raw: { width: w, height: h * 2, channels: 3, pageHeight: h } }).gif().toBuffer()
    expect((await sharp(gif).metadata()).pages).toBe(2)
    const prep = await prepareBitmap(gif, {}, 6)
    expect([prep.width, prep.height]).toEqual([60, 60])
    const box = inkBox(prep.bitmap, 60, 60)
    expect(box.x0).toBeLessThan(10)
    expect(box.x1).toBeLessThan(30)
  })

  it('refuses what is not an image', async () => {
    await expect(prepareBitmap(Buffer.from('not an image at all'), {}, 10)).rejects.toBeInstanceOf(PrepareError)
  })
})

describe('a drawing on a see-through background', () => {
  // A lettered badge (text, a disc with a hole, a stroke) drawn in `fill` on a transparent
  // page, rendered by librsvg through sharp; `page` fills the background instead when given.
  const badge = (fill: string, page?: string) => sharp(Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="600" height="400">${page ? `<rect width="600" height="400" fill="${page}"/>` : ''}
    <g fill="${fill}"><text x="40" y="110" font-family="DejaVu Sans" font-weight="bold" font-size="80">R 17</text>
    <path fill-rule="evenodd" d="M200 170a110 110 0 1 0 1 0zM200 230a50 50 0 1 0 1 0z"/><path d="M380 180l180 180" stroke="${fill}" stroke-width="12"/></g></svg>`)).png().toBuffer()
  const inkReason = (p: Awaited<ReturnType<typeof prepareDrawing>>) => p.choices.find((c) => c.setting === 'inkColour')!.reason

  it('reads a light drawing from its transparency, the same as the drawing in black', async () => {
    const black = await prepareDrawing(await badge('#000'), {}, 120)
    for (const light of [await badge('#fff'), await sharp(await badge('#f4f0e0')).greyscale().png().toBuffer()]) {
      const meta = await sharp(light).metadata()
      expect(meta.hasAlpha).toBe(true)
      const got = await prepareDrawing(light, {}, 120)
      expect([got.width, got.height]).toEqual([black.width, black.height])
      let differ = 0
      for (let i = 0; i < got.bitmap.length; i++) if (got.bitmap[i] !== black.bitmap[i]) differ++
      // librsvg's edge coverage is the same in the alpha of both; at most a rounding at an edge differs.
      expect(differ / got.bitmap.length).toBeLessThan(0.001)
      expect(inkReason(got)).toMatch(/light on a see-through background/)
    }
    expect(inkReason(black)).not.toMatch(/see-through/)
  })

  it('leaves a light picture with little transparency to the usual reading', async () => {
    // A white page with a transparent strip under CLEAR_SHARE of its area: blank paper, as before.
    const w = 600, h = 400, strip = Math.floor(CLEAR_SHARE * 0.8 * w)
    const raw = Buffer.alloc(w * h * 4, 255)
    for (let y = 0; y < h; y++) for (let x = 0; x < strip; x++) raw[(y * w + x) * 4 + 3] = 0
    const png = await sharp(raw, { raw: { width: w, height: h, channels: 4 } }).png().toBuffer()
    await expect(prepareDrawing(png, {}, 120)).rejects.toBeInstanceOf(NotADrawingError)
    // and a drawing on an opaque light page is read by its grey level, as before
    const onPage = await prepareDrawing(await badge('#222', '#fffdf4'), {}, 120)
    expect(inkReason(onPage)).not.toMatch(/see-through/)
  })
})

describe('a drawing asked at a size where the speck filter would take part of it', () => {
  // Five bars and, below them, a row of 40 dots of 1.3 mm across at 100 mm wide (1.3 mm² each,
  // 9 % of the ink): above the default speck filter of 0.5 mm² at 100 mm, under it at 60 mm
  // (0.35 mm²), where the decal would leave them out and be trimmed to the bars.
  const dotted = async () => {
    let dots = '', bars = ''
    for (let i = 0; i < 40; i++) dots += `<circle cx="${42 + i * 22}" cy="300" r="5.5"/>`
    for (let i = 0; i < 5; i++) bars += `<rect x="${40 + i * 200}" y="40" width="40" height="200"/>`
    return sharp(Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="1000" height="400"><rect width="1000" height="400" fill="#fff"/>
      <g fill="#000">${bars}${dots}</g></svg>`)).png().toBuffer()
  }

  it('is refused, saying how much of the ink would be left out, instead of being trimmed to what is left', async () => {
    const source = await dotted()
    const whole = await prepareDrawing(source, {}, 100)
    expect(whole.heightMm).toBeGreaterThan(28) // the dots' row is inside the drawing (the bars alone: 23 mm)
    const refused = prepareDrawing(source, {}, 60)
    await expect(refused).rejects.toBeInstanceOf(NotADrawingError)
    await expect(refused).rejects.toMatchObject({ reason: 'specks', message: expect.stringMatching(/^At this size \d+ % of the drawing's ink is in pieces smaller than the speck filter \(0\.5 mm²\), which the decal would leave out\./) })
    const share = Number(String(await refused.catch((e: Error) => e.message)).match(/(\d+) %/)![1]) / 100
    expect(share).toBeGreaterThanOrEqual(SPECK_INK_LIMIT)
    // With the filter lowered the dots count, and the weeding check judges them by the film's
    // limit: refused under the usual 1 mm², kept (with the drawing's whole height) where the
    // film weeds pieces down to 0.2 mm².
    await expect(prepareDrawing(source, { speckFilterMm2: 0.1 }, 60)).rejects.toThrow(/^Most of the 45 pieces would be smaller than 1 mm²/)
    const kept = await prepareDrawing(source, { speckFilterMm2: 0.1 }, 60, { smallPieceMm2: 0.2 })
    expect(kept.heightMm / 60).toBeCloseTo(whole.heightMm / 100, 2)
  })
})
