// Automatic threshold by Otsu's method on a 256-bin histogram of 8-bit grey levels.
//
// Convention used everywhere in the pipeline: a pixel is INK when grey <= threshold and PAPER
// when grey > threshold. So the threshold k splits the levels into the dark class C0 = [0, k]
// and the light class C1 = [k + 1, 255], which is exactly the split of class C0 = levels 1…k
// in Otsu's paper (levels numbered from 0 here).

/** 256-bin histogram of an 8-bit grey buffer. */
export function histogram(grey: Uint8Array): Uint32Array {
  const h = new Uint32Array(256)
  for (let i = 0; i < grey.length; i++) h[grey[i]!]!++
  return h
}

/**
 * Otsu's threshold: the k that maximises the between-class variance
 *   σ_B²(k) = [μ_T ω(k) − μ(k)]² / [ω(k) (1 − ω(k))]
 * with ω(k) = Σ_{i≤k} p_i, μ(k) = Σ_{i≤k} i p_i, μ_T = μ(255), p_i = h_i / N.
 *
 * The search is exact: with counts W = Σ_{i≤k} h_i and S = Σ_{i≤k} i h_i, σ_B²(k) is
 * (S_T W − S N)² / (N² W (N − W)), and candidates are compared by cross-multiplication in
 * BigInt, so ties are real ties and not floating-point noise.
 *
 * Tie rule: when several k reach the maximum (typically every k inside an empty gap between
 * the ink levels and the paper levels), the result is the midpoint of the smallest and largest
 * maximising k, rounded down. Only k with 0 < ω(k) < 1 are candidates.
 *
 * Degenerate histograms: an empty histogram returns 127; a histogram with a single occupied
 * level v (a blank page, a solid fill) has no split — it counts as all paper when v > 127
 * (returns v − 1) and as all ink otherwise (returns v).
 */
export function otsuThreshold(hist: ArrayLike<number>): number {
  return otsuDetails(hist).threshold
}

export interface OtsuDetails {
  threshold: number
  /** Smallest and largest k reaching the maximum (equal when the maximum is unique). */
  kMin: number
  kMax: number
}

/** otsuThreshold with the whole set of maximising k (kMin…kMax may include non-maximal k between). */
export function otsuDetails(hist: ArrayLike<number>): OtsuDetails {
  if (hist.length !== 256) throw new RangeError('The histogram must have 256 bins.')
  let n = 0n
  let sT = 0n
  let first = -1
  let last = -1
  for (let i = 0; i < 256; i++) {
    const c = hist[i]!
    if (c < 0 || !Number.isInteger(c)) throw new RangeError('Histogram bins must be non-negative integers.')
    if (c > 0) { if (first < 0) first = i; last = i }
    n += BigInt(c)
    sT += BigInt(i) * BigInt(c)
  }
  if (n === 0n) return { threshold: 127, kMin: 127, kMax: 127 }
  if (first === last) {
    const t = first > 127 ? first - 1 : first
    return { threshold: t, kMin: t, kMax: t }
  }

  let bestNum = -1n // (S_T W − S N)²
  let bestDen = 1n // W (N − W)
  let kMin = -1
  let kMax = -1
  let w = 0n
  let s = 0n
  for (let k = 0; k < 255; k++) {
    const c = BigInt(hist[k]!)
    w += c
    s += BigInt(k) * c
    if (w === 0n || w === n) continue
    const d = sT * w - s * n
    const num = d * d
    const den = w * (n - w)
    // compare num/den with bestNum/bestDen (both denominators positive)
    const lhs = num * bestDen
    const rhs = bestNum * den
    if (bestNum < 0n || lhs > rhs) {
      bestNum = num; bestDen = den; kMin = k; kMax = k
    } else if (lhs === rhs) {
      kMax = k
    }
  }
  return { threshold: Math.floor((kMin + kMax) / 2), kMin, kMax }
}

/** Ink mask from a grey buffer: 1 where grey <= threshold. */
export function inkMask(grey: Uint8Array, threshold: number): Uint8Array {
  const out = new Uint8Array(grey.length)
  for (let i = 0; i < grey.length; i++) out[i] = grey[i]! <= threshold ? 1 : 0
  return out
}
