import { Image, computeThreshold } from 'image-js'
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { histogram, otsuDetails, otsuThreshold } from '../../../server/pipeline/otsu'
import { gaussian, mulberry32 } from './helpers'

/**
 * Between-class variance straight from its definition in N. Otsu, "A Threshold Selection
 * Method from Gray-Level Histograms", IEEE Trans. SMC 9(1), 1979, pp. 62–66:
 *   σ_B² = ω0 (μ0 − μT)² + ω1 (μ1 − μT)²,
 * with class C0 = levels 0…k and C1 = k+1…255, each class mean summed separately.
 * Deliberately not the shortcut formula the code uses.
 */
function betweenClassVariance(h: ArrayLike<number>, k: number): number {
  let n = 0, sum = 0
  for (let i = 0; i < 256; i++) { n += h[i]!; sum += i * h[i]! }
  const muT = sum / n
  let n0 = 0, s0 = 0
  for (let i = 0; i <= k; i++) { n0 += h[i]!; s0 += i * h[i]! }
  let n1 = 0, s1 = 0
  for (let i = k + 1; i < 256; i++) { n1 += h[i]!; s1 += i * h[i]! }
  if (n0 === 0 || n1 === 0) return -1
  const w0 = n0 / n, w1 = n1 / n
  const mu0 = s0 / n0, mu1 = s1 / n1
  return w0 * (mu0 - muT) ** 2 + w1 * (mu1 - muT) ** 2
}

function bruteForce(h: ArrayLike<number>): { best: number, argmax: number[] } {
  let best = -1
  const v: number[] = []
  for (let k = 0; k < 255; k++) v.push(betweenClassVariance(h, k))
  for (const x of v) best = Math.max(best, x)
  const argmax = v.flatMap((x, k) => (x >= best * (1 - 1e-12) ? [k] : []))
  return { best, argmax }
}

function imageJsOtsu(grey: Uint8Array, width: number, height: number): number {
  const img = new Image(width, height, { colorModel: 'GREY', data: grey })
  return computeThreshold(img, { algorithm: 'otsu' })
}

function twoClassNoise(seed: number, w: number, h: number, inkShare: number, inkMean: number, inkSd: number, paperMean: number, paperSd: number) {
  const rnd = mulberry32(seed)
  const g = new Uint8Array(w * h)
  for (let i = 0; i < g.length; i++) {
    const ink = rnd() < inkShare
    const v = ink ? inkMean + inkSd * gaussian(rnd) : paperMean + paperSd * gaussian(rnd)
    g[i] = Math.max(0, Math.min(255, Math.round(v)))
  }
  return g
}

async function drawnGrey(): Promise<{ grey: Uint8Array, width: number, height: number }> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="320" height="240">
    <rect width="320" height="240" fill="rgb(225,222,210)"/>
    <circle cx="90" cy="120" r="60" fill="rgb(40,40,60)"/>
    <rect x="170" y="40" width="30" height="160" fill="rgb(70,60,50)"/>
    <rect x="220" y="60" width="70" height="20" fill="rgb(20,20,20)"/></svg>`
  const { data, info } = await sharp(Buffer.from(svg)).blur(1.5).greyscale().raw().toBuffer({ resolveWithObject: true })
  const rnd = mulberry32(7)
  const grey = new Uint8Array(info.width * info.height)
  for (let i = 0; i < grey.length; i++) grey[i] = Math.max(0, Math.min(255, Math.round(data[i * info.channels]! + 6 * gaussian(rnd))))
  return { grey, width: info.width, height: info.height }
}

describe('otsuThreshold', () => {
  const cases: Array<[string, () => Promise<{ grey: Uint8Array, width: number, height: number }>]> = [
    ['ink and paper noise, 30 % ink', async () => ({ grey: twoClassNoise(1, 200, 150, 0.3, 60, 20, 200, 25), width: 200, height: 150 })],
    ['close classes, 10 % ink', async () => ({ grey: twoClassNoise(2, 160, 160, 0.1, 110, 30, 170, 30), width: 160, height: 160 })],
    ['broad paper, 55 % ink', async () => ({ grey: twoClassNoise(3, 120, 100, 0.55, 30, 10, 180, 50), width: 120, height: 100 })],
    ['a drawing (disc, bars) blurred with noise', drawnGrey],
  ]
  for (const [name, make] of cases) {
    it(`maximises Otsu's between-class variance: ${name}`, async () => {
      const { grey, width, height } = await make()
      const h = histogram(grey)
      const k = otsuThreshold(h)
      const brute = bruteForce(h)
      // Otsu 1979: the chosen k maximises σ_B²(k)
      expect(betweenClassVariance(h, k)).toBeGreaterThanOrEqual(brute.best * (1 - 1e-12))
      expect(brute.argmax).toContain(k)
      // Second opinion: image-js (node_modules/image-js/lib/operations/thresholds/otsu.js)
      // returns the last k of the maximum, with the same classes: dark = [0, k] (its mask is
      // value > k). With a single maximum the two agree; near-ties can differ by a grey level
      // because image-js compares floating-point products while we compare exactly.
      const theirs = imageJsOtsu(grey, width, height)
      expect(Math.abs(theirs - k)).toBeLessThanOrEqual(1)
    })
  }

  it('agrees with brute force and image-js on random histograms', () => {
    const rnd = mulberry32(99)
    let exact = 0
    for (let trial = 0; trial < 40; trial++) {
      const grey = twoClassNoise(1000 + trial, 64, 64, 0.05 + 0.9 * rnd(), 20 + 100 * rnd(), 5 + 30 * rnd(), 130 + 100 * rnd(), 5 + 40 * rnd())
      const h = histogram(grey)
      const k = otsuThreshold(h)
      const brute = bruteForce(h)
      expect(brute.argmax, `trial ${trial}`).toContain(k)
      // image-js keeps the LAST maximising level; ours is the middle of the maximising
      // levels (they differ when an empty gap separates ink from paper). Apples to apples:
      // compare image-js with the upper end of our set of maximisers.
      const { kMax } = otsuDetails(h)
      expect(brute.argmax.at(-1), `trial ${trial}`).toBe(kMax)
      const theirs = imageJsOtsu(grey, 64, 64)
      expect(Math.abs(theirs - kMax), `trial ${trial}`).toBeLessThanOrEqual(1)
      if (theirs === kMax) exact++
    }
    expect(exact).toBeGreaterThanOrEqual(38)
  })

  it('takes the middle of a tie (empty gap between ink and paper)', () => {
    // Only two levels, 50 and 200: every k in 50…199 splits them identically.
    const grey = new Uint8Array(1000)
    grey.fill(50, 0, 300)
    grey.fill(200, 300)
    const h = histogram(grey)
    const brute = bruteForce(h)
    expect(brute.argmax[0]).toBe(50)
    expect(brute.argmax.at(-1)).toBe(199)
    expect(otsuThreshold(h)).toBe(Math.floor((50 + 199) / 2))
    // image-js takes the last maximising level of the same tie
    expect(imageJsOtsu(grey, 100, 10)).toBe(199)
  })

  it('handles degenerate histograms', () => {
    const blank = new Uint32Array(256)
    blank[255] = 100
    expect(otsuThreshold(blank)).toBe(254) // a blank page: no ink (255 > 254)
    const solid = new Uint32Array(256)
    solid[10] = 100
    expect(otsuThreshold(solid)).toBe(10) // a solid dark fill: all ink
    expect(otsuThreshold(new Uint32Array(256))).toBe(127)
    expect(() => otsuThreshold(new Uint32Array(10))).toThrow(RangeError)
  })
})
