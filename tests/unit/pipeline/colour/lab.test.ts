// Colour conversion and difference, against the published standards and an outside library.
import { describe, expect, it } from 'vitest'
import { colourName, deltaE00, labToHex, paperTint, srgbToLab, type Lab } from '../../../../server/pipeline/colour/lab'
import { python } from '../../cutsheet/reference'
import { mulberry32 } from '../helpers'

// G. Sharma, W. Wu, E. N. Dalal, "The CIEDE2000 color-difference formula: implementation
// notes, supplementary test data, and mathematical observations", Color Research and
// Application 30(1), 2005, Table 1: the 34 pairs (L1 a1 b1, L2 a2 b2) and their ΔE00 to four
// decimals (kL = kC = kH = 1).
const SHARMA_TABLE_1: Array<[number, number, number, number, number, number, number]> = [
  [50.0000, 2.6772, -79.7751, 50.0000, 0.0000, -82.7485, 2.0425],
  [50.0000, 3.1571, -77.2803, 50.0000, 0.0000, -82.7485, 2.8615],
  [50.0000, 2.8361, -74.0200, 50.0000, 0.0000, -82.7485, 3.4412],
  [50.0000, -1.3802, -84.2814, 50.0000, 0.0000, -82.7485, 1.0000],
  [50.0000, -1.1848, -84.8006, 50.0000, 0.0000, -82.7485, 1.0000],
  [50.0000, -0.9009, -85.5211, 50.0000, 0.0000, -82.7485, 1.0000],
  [50.0000, 0.0000, 0.0000, 50.0000, -1.0000, 2.0000, 2.3669],
  [50.0000, -1.0000, 2.0000, 50.0000, 0.0000, 0.0000, 2.3669],
  [50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0009, 7.1792],
  [50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0010, 7.1792],
  [50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0011, 7.2195],
  [50.0000, 2.4900, -0.0010, 50.0000, -2.4900, 0.0012, 7.2195],
  [50.0000, -0.0010, 2.4900, 50.0000, 0.0009, -2.4900, 4.8045],
  [50.0000, -0.0010, 2.4900, 50.0000, 0.0010, -2.4900, 4.8045],
  [50.0000, -0.0010, 2.4900, 50.0000, 0.0011, -2.4900, 4.7461],
  [50.0000, 2.5000, 0.0000, 50.0000, 0.0000, -2.5000, 4.3065],
  [50.0000, 2.5000, 0.0000, 73.0000, 25.0000, -18.0000, 27.1492],
  [50.0000, 2.5000, 0.0000, 61.0000, -5.0000, 29.0000, 22.8977],
  [50.0000, 2.5000, 0.0000, 56.0000, -27.0000, -3.0000, 31.9030],
  [50.0000, 2.5000, 0.0000, 58.0000, 24.0000, 15.0000, 19.4535],
  [50.0000, 2.5000, 0.0000, 50.0000, 3.1736, 0.5854, 1.0000],
  [50.0000, 2.5000, 0.0000, 50.0000, 3.2972, 0.0000, 1.0000],
  [50.0000, 2.5000, 0.0000, 50.0000, 1.8634, 0.5757, 1.0000],
  [50.0000, 2.5000, 0.0000, 50.0000, 3.2592, 0.3350, 1.0000],
  [60.2574, -34.0099, 36.2677, 60.4626, -34.1751, 39.4387, 1.2644],
  [63.0109, -31.0961, -5.8663, 62.8187, -29.7946, -4.0864, 1.2630],
  [61.2901, 3.7196, -5.3901, 61.4292, 2.2480, -4.9620, 1.8731],
  [35.0831, -44.1164, 3.7933, 35.0232, -40.0716, 1.5901, 1.8645],
  [22.7233, 20.0904, -46.6940, 23.0331, 14.9730, -42.5619, 2.0373],
  [36.4612, 47.8580, 18.3852, 36.2715, 50.5065, 21.2231, 1.4146],
  [90.8027, -2.0831, 1.4410, 91.1528, -1.6435, 0.0447, 1.4441],
  [90.9257, -0.5406, -0.9208, 88.6381, -0.8985, -0.7239, 1.5381],
  [6.7747, -0.2908, -2.4247, 5.8714, -0.0985, -2.2286, 0.6377],
  [2.0776, 0.0795, -1.1350, 0.9033, -0.0636, -0.5514, 0.9082],
]

describe('CIEDE2000', () => {
  it('gives the 34 published pairs of Sharma, Wu & Dalal (2005, Table 1) to four decimals, both ways round', () => {
    expect(SHARMA_TABLE_1).toHaveLength(34)
    for (const [l1, a1, b1, l2, a2, b2, expected] of SHARMA_TABLE_1) {
      const x = { l: l1, a: a1, b: b1 }, y = { l: l2, a: a2, b: b2 }
      expect(Math.abs(deltaE00(x, y) - expected)).toBeLessThan(0.00005)
      expect(Math.abs(deltaE00(y, x) - expected)).toBeLessThan(0.00005)
    }
  })
})

describe('sRGB → CIELAB (D65)', () => {
  // IEC 61966-2-1 (sRGB: transfer function, primaries, D65 white) and CIE 15 (CIELAB): the
  // white point maps to L* 100, a* = b* = 0; black to 0. sRGB red 53.24, 80.09, 67.20 is the
  // textbook value (from memory), within rounding of the matrix used.
  it('maps white, black, grey and the red primary to their known values', () => {
    const white = srgbToLab(255, 255, 255)
    expect(white.l).toBeCloseTo(100, 3)
    expect(Math.abs(white.a)).toBeLessThan(0.01)
    expect(Math.abs(white.b)).toBeLessThan(0.01)
    expect(srgbToLab(0, 0, 0)).toEqual({ l: 0, a: 0, b: 0 })
    const red = srgbToLab(255, 0, 0)
    expect(red.l).toBeCloseTo(53.24, 1)
    expect(red.a).toBeCloseTo(80.09, 1)
    expect(red.b).toBeCloseTo(67.20, 1)
    // A neutral grey has no chroma, and its L* follows the sRGB curve: 128 → L* 53.59 (from memory).
    const grey = srgbToLab(128, 128, 128)
    expect(grey.l).toBeCloseTo(53.59, 1)
    expect(Math.hypot(grey.a, grey.b)).toBeLessThan(0.01)
  })

  it('agrees with Debian\'s scikit-image (skimage.color.rgb2lab, D65) on 300 random colours within 0.02', () => {
    const rnd = mulberry32(61)
    const colours = Array.from({ length: 300 }, () => [0, 0, 0].map(() => Math.floor(rnd() * 256)) as [number, number, number])
    const theirs = python<number[][]>(`
import json, sys
import numpy as np
from skimage.color import rgb2lab
rgb = np.array(json.load(sys.stdin), dtype=float).reshape(1, -1, 3) / 255.0
print(json.dumps(rgb2lab(rgb, illuminant="D65", observer="2")[0].tolist()))
`, colours, ['skimage'])
    let worst = 0
    colours.forEach((c, i) => {
      const ours = srgbToLab(c[0], c[1], c[2])
      const t = theirs[i]!
      worst = Math.max(worst, Math.abs(ours.l - t[0]!), Math.abs(ours.a - t[1]!), Math.abs(ours.b - t[2]!))
    })
    expect(worst).toBeLessThan(0.02)
  })

  it('goes back to the same sRGB hex', () => {
    for (const hex of ['#d8262e', '#1d4fb8', '#f7d417', '#000000', '#ffffff', '#7f7f7f']) {
      const n = parseInt(hex.slice(1), 16)
      expect(labToHex(srgbToLab(n >> 16, (n >> 8) & 255, n & 255))).toBe(hex)
    }
  })
})

describe('colour words', () => {
  const lab = (hex: string): Lab => { const n = parseInt(hex.slice(1), 16); return srgbToLab(n >> 16, (n >> 8) & 255, n & 255) }
  it.each([
    ['#ff0000', 'red'], ['#d8262e', 'red'], ['#ff8000', 'orange'], ['#ffff00', 'yellow'], ['#f7d417', 'yellow'],
    ['#00a000', 'green'], ['#0000ff', 'blue'], ['#1d4fb8', 'blue'], ['#800080', 'purple'], ['#ff69b4', 'pink'], ['#e04a8a', 'pink'],
    ['#8b4513', 'brown'], ['#00a0a0', 'teal'], ['#1c1b1f', 'black'], ['#808080', 'grey'], ['#ffffff', 'white'],
  ])('%s reads as %s', (hex, name) => {
    expect(colourName(lab(hex))).toBe(name)
  })

  it('names a paper\'s tint, and none for white paper', () => {
    expect(paperTint(lab('#f5eedc'))).toBe('cream')
    expect(paperTint(lab('#e8eef8'))).toBe('bluish')
    expect(paperTint(lab('#fdfdfd'))).toBeNull()
  })
})
