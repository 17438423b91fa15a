import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { LUMA, luma, toGrey } from '../../../server/pipeline/luma'
import { prepareBitmap } from '../../../server/pipeline/prepare'

// Coefficients as published, typed here independently of the code under test.
// ITU-R Recommendation BT.601: Y′ = 0.299 R′ + 0.587 G′ + 0.114 B′
const BT601 = [0.299, 0.587, 0.114] as const
// ITU-R Recommendation BT.709: Y′ = 0.2126 R′ + 0.7152 G′ + 0.0722 B′
const BT709 = [0.2126, 0.7152, 0.0722] as const

const pixels: Array<[string, number, number, number]> = [
  ['red', 255, 0, 0], ['green', 0, 255, 0], ['blue', 0, 0, 255],
  ['white', 255, 255, 255], ['black', 0, 0, 0], ['grey 128', 128, 128, 128], ['grey 37', 37, 37, 37],
  ['a colour', 200, 120, 40],
]

describe('luma', () => {
  it('has the published coefficient tables', () => {
    expect([LUMA.bt601.r, LUMA.bt601.g, LUMA.bt601.b]).toEqual([...BT601]) // ITU-R BT.601
    expect([LUMA.bt709.r, LUMA.bt709.g, LUMA.bt709.b]).toEqual([...BT709]) // ITU-R BT.709
  })

  for (const [std, k] of [['bt601', BT601], ['bt709', BT709]] as const) {
    it(`converts R′G′B′ pixels with ${std}`, () => {
      const rgb = new Uint8Array(pixels.flatMap(([, r, g, b]) => [r, g, b]))
      const grey = toGrey(rgb, pixels.length, 1, 3, std)
      pixels.forEach(([name, r, g, b], i) => {
        const expected = Math.round(k[0] * r + k[1] * g + k[2] * b)
        expect(grey[i], name).toBe(Math.min(255, expected))
        expect(luma(r, g, b, std)).toBeCloseTo(k[0] * r + k[1] * g + k[2] * b, 10)
      })
    })
  }

  it('rounds all 16.7 million colours as the published formulas do, a half up, in both standards', () => {
    // Reference in whole numbers from the published coefficients: 1000·Y′ = 299 R′ + 587 G′ +
    // 114 B′ (BT.601) and 10000·Y′ = 2126 R′ + 7152 G′ + 722 B′ (BT.709), rounded by integer division.
    const rgb = new Uint8Array(3 << 24)
    for (let i = 0, j = 0; i < 1 << 24; i++, j += 3) { rgb[j] = i >> 16; rgb[j + 1] = (i >> 8) & 255; rgb[j + 2] = i & 255 }
    for (const [std, d, k] of [['bt601', 1000, [299, 587, 114]], ['bt709', 10000, [2126, 7152, 722]]] as const) {
      const grey = toGrey(rgb, 4096, 4096, 3, std)
      let wrong = 0, first = -1
      for (let i = 0; i < 1 << 24; i++) {
        const s = k[0] * (i >> 16) + k[1] * ((i >> 8) & 255) + k[2] * (i & 255)
        if (grey[i] !== (s + d / 2 - ((s + d / 2) % d)) / d) { wrong++; if (first < 0) first = i }
      }
      expect(wrong, `${std}: first at ${first >> 16}, ${(first >> 8) & 255}, ${first & 255}`).toBe(0)
    }
    // A tie that a sum of floating-point products misses: 0.587·36 + 0.114·12 is 22.5 exactly.
    expect([...toGrey(new Uint8Array([0, 36, 12]), 1, 1, 3, 'bt601')]).toEqual([23])
    expect([...toGrey(new Uint8Array([0, 36, 12, 255]), 1, 1, 4, 'bt601')]).toEqual([23])
  })

  it('gives the textbook values for pure primaries', () => {
    // 255 × coefficient, rounded: BT.601 red 76.245, green 149.685, blue 29.07
    expect([...toGrey(new Uint8Array([255, 0, 0, 0, 255, 0, 0, 0, 255]), 3, 1, 3, 'bt601')]).toEqual([76, 150, 29])
    // BT.709 red 54.213, green 182.376, blue 18.411
    expect([...toGrey(new Uint8Array([255, 0, 0, 0, 255, 0, 0, 0, 255]), 3, 1, 3, 'bt709')]).toEqual([54, 182, 18])
    // grey stays grey in both (coefficients sum to 1)
    expect([...toGrey(new Uint8Array([128, 128, 128]), 1, 1, 3, 'bt709')]).toEqual([128])
    expect([...toGrey(new Uint8Array([128, 128, 128]), 1, 1, 3, 'bt601')]).toEqual([128])
  })

  it('flattens transparency onto white first', () => {
    const rgba = new Uint8Array([0, 0, 0, 0, 0, 0, 0, 255, 0, 0, 0, 128, 255, 0, 0, 0])
    const grey = toGrey(rgba, 4, 1, 4, 'bt709')
    expect(grey[0]).toBe(255) // fully transparent black is paper
    expect(grey[1]).toBe(0)
    expect(grey[2]).toBe(Math.round(255 * (1 - 128 / 255))) // half-covered black over white
    expect(grey[3]).toBe(255) // transparent red is paper too
    expect([...toGrey(new Uint8Array([0, 0, 10, 255]), 2, 1, 2, 'bt601')]).toEqual([255, 10])
  })

  it('is the luma prepareBitmap uses', async () => {
    // A pure red square: BT.709 luma 54, BT.601 luma 76. A manual threshold of 60 makes it ink
    // under BT.709 and paper under BT.601.
    const png = await sharp({ create: { width: 50, height: 50, channels: 3, background: { r: 255, g: 0, b: 0 } } }).png().toBuffer()
    const a = await prepareBitmap(png, { luma: 'bt709', threshold: { mode: 'manual', value: 60 } }, 5)
    const b = await prepareBitmap(png, { luma: 'bt601', threshold: { mode: 'manual', value: 60 } }, 5)
    expect(a.bitmap.every((v) => v === 1)).toBe(true)
    expect(b.bitmap.every((v) => v === 0)).toBe(true)
  })
})
