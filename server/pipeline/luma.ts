// Greyscale with a named luma standard, computed on gamma-encoded R′G′B′ (the 8-bit values
// as stored in the file, no linearisation), as both standards define luma Y′.

export type LumaStandard = 'bt601' | 'bt709'

export interface LumaCoefficients {
  readonly name: string
  readonly r: number
  readonly g: number
  readonly b: number
}

/** Luma coefficients: Y′ = r·R′ + g·G′ + b·B′ (each set sums to 1). */
export const LUMA: Readonly<Record<LumaStandard, LumaCoefficients>> = Object.freeze({
  // ITU-R Recommendation BT.601: Y′ = 0.299 R′ + 0.587 G′ + 0.114 B′
  bt601: Object.freeze({ name: 'ITU-R BT.601', r: 0.299, g: 0.587, b: 0.114 }),
  // ITU-R Recommendation BT.709: Y′ = 0.2126 R′ + 0.7152 G′ + 0.0722 B′
  bt709: Object.freeze({ name: 'ITU-R BT.709', r: 0.2126, g: 0.7152, b: 0.0722 }),
})

/** D with D × each coefficient a whole number (four decimals at most). */
const WHOLE: Readonly<Record<LumaStandard, number>> = { bt601: 1000, bt709: 10000 }

/** Luma of one gamma-encoded 8-bit pixel, unrounded (0…255). */
export function luma(r: number, g: number, b: number, standard: LumaStandard): number {
  const k = LUMA[standard]
  return k.r * r + k.g * g + k.b * b
}

/**
 * Interleaved 8-bit pixels (1 = grey, 2 = grey + alpha, 3 = R′G′B′, 4 = R′G′B′A) to an 8-bit
 * grey buffer, one byte per pixel, rounded to the nearest level (a half up).
 *
 * Transparency is flattened onto white first, per channel on the encoded values:
 * c′ = c·α + 255·(1 − α) with α = A/255 (the usual "over a white page" composite of 8-bit
 * images). A fully transparent pixel is paper.
 */
export function toGrey(
  data: Uint8Array | Buffer,
  width: number,
  height: number,
  channels: 1 | 2 | 3 | 4,
  standard: LumaStandard,
): Uint8Array {
  const n = width * height
  if (data.length < n * channels) throw new RangeError(`Expected ${n * channels} bytes of pixel data, got ${data.length}.`)
  const out = new Uint8Array(n)
  const k = LUMA[standard]
  // Lookup tables: each coefficient times each level, so the inner loop is three loads. In
  // whole numbers: the coefficients have at most four decimals, so D·Y′ is a whole number and
  // rounds exactly (half up), where a sum of floating-point products can fall either side of a
  // half (BT.601 on 0, 36, 12 gives 22.499999999999996 for 22.5).
  const D = WHOLE[standard]
  const ir = new Int32Array(256)
  const ig = new Int32Array(256)
  const ib = new Int32Array(256)
  for (let v = 0; v < 256; v++) { ir[v] = Math.round(k.r * D) * v; ig[v] = Math.round(k.g * D) * v; ib[v] = Math.round(k.b * D) * v }
  // floor(s / D) for whole s ≤ 256·D: the product is within 1e-12 of the quotient, whose
  // fraction is a multiple of 1/D, so a nudge of 1e-9 makes truncation exact.
  const inv = 1 / D, half = D / 2

  if (channels === 1) {
    out.set(data.subarray(0, n))
    return out
  }
  if (channels === 2) {
    for (let i = 0, j = 0; i < n; i++, j += 2) {
      const a = data[j + 1]!
      out[i] = a === 255 ? data[j]! : Math.round((data[j]! * a + 255 * (255 - a)) / 255)
    }
    return out
  }
  if (channels === 3) {
    // The coefficients sum to 1, so the sum never exceeds 255·D.
    for (let i = 0, j = 0; i < n; i++, j += 3) out[i] = ((ir[data[j]!]! + ig[data[j + 1]!]! + ib[data[j + 2]!]! + half) * inv + 1e-9) | 0
    return out
  }
  for (let i = 0, j = 0; i < n; i++, j += 4) {
    const a = data[j + 3]!
    if (a === 255) {
      out[i] = ((ir[data[j]!]! + ig[data[j + 1]!]! + ib[data[j + 2]!]! + half) * inv + 1e-9) | 0
      continue
    }
    const f = a / 255
    const w = 255 * (1 - f)
    const y = k.r * (data[j]! * f + w) + k.g * (data[j + 1]! * f + w) + k.b * (data[j + 2]! * f + w)
    out[i] = y >= 255 ? 255 : Math.round(y)
  }
  return out
}
