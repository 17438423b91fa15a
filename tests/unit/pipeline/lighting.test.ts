import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { closingOfRepeated, evenLighting, paperEstimate, squareExtremumFilter } from '../../../server/pipeline/lighting'
import { toGrey } from '../../../server/pipeline/luma'
import { histogram, otsuThreshold } from '../../../server/pipeline/otsu'
import { prepareBitmap } from '../../../server/pipeline/prepare'
import { gaussian, mulberry32, svgDoc, svgToBitmap } from './helpers'

describe('square max and min filters (van Herk / Gil-Werman)', () => {
  it('equal a brute-force window scan', () => {
    const rnd = mulberry32(8)
    const w = 41, h = 29
    const img = new Uint8Array(w * h).map(() => Math.floor(rnd() * 256))
    for (const size of [1, 3, 7, 15, 61]) {
      for (const isMax of [true, false]) {
        const got = squareExtremumFilter(img, w, h, size, isMax)
        const r = (size - 1) / 2
        for (let y = 0; y < h; y++) {
          for (let x = 0; x < w; x++) {
            let v = isMax ? 0 : 255
            for (let yy = Math.max(0, y - r); yy <= Math.min(h - 1, y + r); yy++) {
              for (let xx = Math.max(0, x - r); xx <= Math.min(w - 1, x + r); xx++) {
                v = isMax ? Math.max(v, img[yy * w + xx]!) : Math.min(v, img[yy * w + xx]!)
              }
            }
            expect(got[y * w + x]).toBe(v)
          }
        }
      }
    }
  })
})

describe('closing of the image extended by its edge pixels', () => {
  // The definition, scanned pixel by pixel: the image extended without end by repeating its
  // edge pixels (clamped coordinates), its max-filter over the whole plane, then the
  // min-filter of that, read on the image. No margin, no clipping: every window is whole.
  it('equals a brute-force scan of the extended image, whatever the margin the filters work on', () => {
    const rnd = mulberry32(21)
    for (const [w, h] of [[23, 17], [9, 31], [1, 12], [40, 3]] as const) {
      const img = new Uint8Array(w * h).map(() => Math.floor(rnd() * 256))
      const at = (x: number, y: number) => img[Math.min(h - 1, Math.max(0, y)) * w + Math.min(w - 1, Math.max(0, x))]!
      for (const size of [1, 3, 5, 11, 25]) {
        const r = (size - 1) / 2
        const max = (x: number, y: number) => {
          let v = 0
          for (let yy = y - r; yy <= y + r; yy++) for (let xx = x - r; xx <= x + r; xx++) v = Math.max(v, at(xx, yy))
          return v
        }
        const got = closingOfRepeated(img, w, h, size)
        for (let y = 0; y < h; y++) {
          for (let x = 0; x < w; x++) {
            let v = 255
            for (let yy = y - r; yy <= y + r; yy++) for (let xx = x - r; xx <= x + r; xx++) v = Math.min(v, max(xx, yy))
            expect(got[y * w + x], `${w} × ${h}, window ${size}, at (${x}, ${y})`).toBe(v)
          }
        }
      }
    }
  })
})

// A phone photo made in code: a drawing with large solid fills (a disc 40 % of the short side
// across, thick block letters) and two thinner strokes, photographed under a lighting gradient,
// a vignette and a soft shadow, with Gaussian noise, a little lens blur, a warm tint, JPEG.
const W = 900, H = 600
const DISC = { cx: 230, cy: 300, r: 120 } // diameter 240 = 40 % of 600
const DRAWING = svgDoc(W, H, `<circle cx="${DISC.cx}" cy="${DISC.cy}" r="${DISC.r}"/>
  <rect x="420" y="110" width="170" height="45"/><rect x="482" y="110" width="46" height="200"/>
  <rect x="620" y="110" width="45" height="200"/><rect x="620" y="110" width="130" height="42"/>
  <rect x="620" y="190" width="110" height="40"/><rect x="620" y="268" width="130" height="42"/>
  <path d="M420 400 Q600 330 820 470" stroke="#000" stroke-width="14" fill="none"/>
  <path d="M430 500 L820 530" stroke="#000" stroke-width="6" fill="none"/>`)

async function phonePhoto(): Promise<{ jpeg: Buffer, clean: Uint8Array }> {
  const clean = (await svgToBitmap(DRAWING)).bitmap
  const reflectance = Buffer.from(clean.map((v) => (v ? 0.2 * 255 : 0.92 * 255)))
  const lens = await sharp(reflectance, { raw: { width: W, height: H, channels: 1 } }).blur(1.2).toColourspace('b-w').raw().toBuffer()
  const rnd = mulberry32(42)
  const rgb = Buffer.alloc(W * H * 3)
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      const i = y * W + x
      const gradient = 1 - 0.6 * (x / W) // light falls off to the right
      const dx = (x - W / 2) / (W / 2), dy = (y - H / 2) / (H / 2)
      const vignette = 1 - 0.25 * (dx * dx + dy * dy)
      const shadow = 1 - 0.5 / (1 + Math.exp((x + 0.6 * y - 420) / 90)) // soft, lower left
      const v = lens[i]! * gradient * vignette * shadow + 6 * gaussian(rnd)
      rgb[i * 3] = Math.max(0, Math.min(255, Math.round(v)))
      rgb[i * 3 + 1] = Math.max(0, Math.min(255, Math.round(v * 0.96)))
      rgb[i * 3 + 2] = Math.max(0, Math.min(255, Math.round(v * 0.88)))
    }
  }
  const jpeg = await sharp(rgb, { raw: { width: W, height: H, channels: 3 } }).jpeg({ quality: 80 }).toBuffer()
  return { jpeg, clean }
}

function errors(bm: Uint8Array, clean: Uint8Array) {
  let wrong = 0, ink = 0
  for (let i = 0; i < bm.length; i++) {
    if (bm[i] !== clean[i]) wrong++
    if (clean[i]) ink++
  }
  return { overAll: wrong / bm.length, overInk: wrong / ink }
}

/** Share of the disc's inner part (radius < 0.8 r) that came out as paper. */
function hollowShare(bm: Uint8Array): number {
  let n = 0, paper = 0
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      if ((x - DISC.cx) ** 2 + (y - DISC.cy) ** 2 < (0.8 * DISC.r) ** 2) { n++; if (!bm[y * W + x]) paper++ }
    }
  }
  return paper / n
}

function meanInDisc(grey: Uint8Array): number {
  let n = 0, s = 0
  for (let y = 0; y < H; y++) {
    for (let x = 0; x < W; x++) {
      if ((x - DISC.cx) ** 2 + (y - DISC.cy) ** 2 < (0.5 * DISC.r) ** 2) { n++; s += grey[y * W + x]! }
    }
  }
  return s / n
}

describe('lighting evening on a phone photo', () => {
  it('recovers the drawing: ≤ 3 % of all pixels wrong, and beats plain division by a blur', async () => {
    const { jpeg, clean } = await phonePhoto()

    // Through the whole preparation: evening on, automatic threshold; 90 mm at 10 px/mm = 900 px.
    const prep = await prepareBitmap(jpeg, { lightingEvening: { enabled: true, strength: 1 }, threshold: { mode: 'auto' } }, 90)
    expect(prep.width).toBe(W)
    const ours = errors(prep.bitmap, clean)
    // Measure: misclassified pixels over ALL pixels (the criterion), and over ink pixels (reported).
    console.info(`lighting evening: ${(100 * ours.overAll).toFixed(3)} % of all pixels wrong, ${(100 * ours.overInk).toFixed(3)} % of the ink's pixel count`)
    expect(ours.overAll).toBeLessThanOrEqual(0.03)
    expect(ours.overInk).toBeLessThanOrEqual(0.10)
    expect(hollowShare(prep.bitmap)).toBe(0)

    // Without evening, a single threshold cannot cope with this light…
    const plain = await prepareBitmap(jpeg, { lightingEvening: { mode: 'off' }, threshold: { mode: 'otsu' } }, 90)
    expect(errors(plain.bitmap, clean).overAll).toBeGreaterThan(0.05)
    // …so at the defaults the analysis turns evening on by itself, and says why.
    const auto = await prepareBitmap(jpeg, {}, 90)
    expect(errors(auto.bitmap, clean).overAll).toBeLessThanOrEqual(0.03)
    const choice = auto.choices.find((c) => c.setting === 'lightingEvening')!
    expect(choice).toMatchObject({ automatic: true, value: { mode: 'on' } })
    expect(choice.reason).toMatch(/darker at the (bottom |top )?(left|right)|towards the edges/)

    // The naive method: divide by a blur of the same size, without the max-filter (and min-filter).
    const { data, info } = await sharp(jpeg).raw().toBuffer({ resolveWithObject: true })
    const grey = toGrey(data, W, H, info.channels as 3, 'bt709')
    const naiveGrey = await evenLighting(grey, W, H, { method: 'blur' })
    const t = otsuThreshold(histogram(naiveGrey))
    const naive = naiveGrey.map((v) => (v <= t ? 1 : 0))
    const oursGrey = await evenLighting(grey, W, H)
    // The blur takes the disc itself for shading: the disc's middle is lifted towards paper…
    expect(meanInDisc(naiveGrey) - meanInDisc(oursGrey)).toBeGreaterThan(40)
    // …and part of it comes out as paper (hollowed), where ours keeps it whole.
    expect(hollowShare(naive)).toBeGreaterThan(0.01)
    // Overall, ours has several times fewer wrong pixels.
    expect(errors(naive, clean).overAll).toBeGreaterThan(5 * ours.overAll)
  })

  it('strength blends between none and full; a flat page is left flat', async () => {
    const w = 200, h = 100
    const grey = new Uint8Array(w * h)
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) grey[y * w + x] = Math.round(240 - 100 * (x / w))
    const none = await evenLighting(grey, w, h, { strength: 0 })
    expect([...none]).toEqual([...grey])
    const full = await evenLighting(grey, w, h, { strength: 1 })
    const half = await evenLighting(grey, w, h, { strength: 0.5 })
    // a pure gradient of bare paper becomes (nearly) white
    const min = full.reduce((m, v) => Math.min(m, v), 255)
    expect(min).toBeGreaterThanOrEqual(245)
    for (let i = 0; i < grey.length; i += 97) {
      expect(Math.abs(half[i]! - (grey[i]! + full[i]!) / 2)).toBeLessThanOrEqual(1)
    }
    const est = await paperEstimate(grey, w, h)
    for (let i = 0; i < grey.length; i += 53) expect(Math.abs(est[i]! - grey[i]!)).toBeLessThanOrEqual(6)
  })
})
