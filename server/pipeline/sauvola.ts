// Adaptive threshold by Sauvola's method: every pixel gets its own level from the mean m and
// standard deviation s of the grey levels in a square window around it,
//
//   T(x, y) = m(x, y) · (1 + k · (s(x, y) / R − 1))
//
// (J. Sauvola, M. Pietikäinen, "Adaptive document image binarization", Pattern Recognition 33
// (2000) 225–236), with R the dynamic range of the standard deviation: half the 8-bit range,
// 127.5. A pixel is ink when grey ≤ T, as with every threshold in the pipeline. Where the paper
// is plain (s ≈ 0) the level sits a fraction k below the local mean, so shading and faint
// pencil are judged against the paper right around them.
//
// Window sums are computed as with an integral image (summed-area table), in time linear in
// the pixel count whatever the window: each row keeps the column sums of the window's rows
// (add the row entering, subtract the row leaving) and slides a horizontal window over them.
// Only one row of column sums is kept, not the whole table, so memory stays at a few rows.
// Sums are in double precision, exact for 8-bit input.
//
// Near the border the window is filled by mirroring the image about its edge pixels
// (… c b | a b c … , the edge pixel not repeated), as general image libraries do.

/** Mirror an index into 0…n−1 about the end pixels (period 2(n − 1)). */
export function reflectIndex(i: number, n: number): number {
  if (n === 1) return 0
  const period = 2 * (n - 1)
  let j = i % period
  if (j < 0) j += period
  return j < n ? j : period - j
}

export interface SauvolaParameters {
  /** Window side in pixels, odd. */
  window: number
  /** Default 0.2. */
  k?: number
  /** Dynamic range of the standard deviation; default 127.5 (half of 0…255). */
  r?: number
}

/**
 * Walk the image row by row, calling `row(y, mean, std)` with the window mean and standard
 * deviation of every pixel of row y (buffers reused between rows).
 */
function localMeanStd(
  grey: Uint8Array, width: number, height: number, window: number,
  row: (y: number, mean: Float64Array, std: Float64Array) => void,
): void {
  if (window < 1 || window % 2 !== 1) throw new RangeError('The window side must be an odd whole number of pixels.')
  const half = (window - 1) >> 1
  const n = window * window
  const colSum = new Float64Array(width)
  const colSq = new Float64Array(width)
  // Padded row of column sums (mirrored at the ends) and its prefix sums.
  const padW = width + 2 * half
  const xs = new Int32Array(padW)
  for (let p = 0; p < padW; p++) xs[p] = reflectIndex(p - half, width)
  const prefix = new Float64Array(padW + 1)
  const prefixSq = new Float64Array(padW + 1)
  const mean = new Float64Array(width)
  const std = new Float64Array(width)

  const addRow = (yy: number, sign: number) => {
    const o = reflectIndex(yy, height) * width
    for (let x = 0; x < width; x++) {
      const v = grey[o + x]!
      colSum[x]! += sign * v
      colSq[x]! += sign * v * v
    }
  }
  for (let yy = -half; yy <= half; yy++) addRow(yy, 1)
  for (let y = 0; y < height; y++) {
    if (y > 0) { addRow(y + half, 1); addRow(y - half - 1, -1) }
    for (let p = 0; p < padW; p++) {
      const x = xs[p]!
      prefix[p + 1] = prefix[p]! + colSum[x]!
      prefixSq[p + 1] = prefixSq[p]! + colSq[x]!
    }
    for (let x = 0; x < width; x++) {
      const s = prefix[x + window]! - prefix[x]!
      const sq = prefixSq[x + window]! - prefixSq[x]!
      const m = s / n
      const variance = sq / n - m * m
      mean[x] = m
      std[x] = variance > 0 ? Math.sqrt(variance) : 0
    }
    row(y, mean, std)
  }
}

/** Walk the image row by row with the threshold T of every pixel of the row. */
function thresholdRows(grey: Uint8Array, width: number, height: number, p: SauvolaParameters, row: (y: number, t: Float64Array) => void): void {
  const k = p.k ?? 0.2
  const r = p.r ?? 127.5
  const t = new Float64Array(width)
  localMeanStd(grey, width, height, p.window, (y, mean, std) => {
    for (let x = 0; x < width; x++) t[x] = mean[x]! * (1 + k * (std[x]! / r - 1))
    row(y, t)
  })
}

/** The threshold surface T(x, y), row-major, in double precision (for checks and the bench). */
export function sauvolaThresholds(grey: Uint8Array, width: number, height: number, p: SauvolaParameters): Float64Array {
  const out = new Float64Array(width * height)
  thresholdRows(grey, width, height, p, (y, t) => out.set(t, y * width))
  return out
}

/** Ink (1) where grey ≤ T(x, y), paper (0) elsewhere. */
export function sauvolaBitmap(grey: Uint8Array, width: number, height: number, p: SauvolaParameters): Uint8Array {
  const out = new Uint8Array(width * height)
  thresholdRows(grey, width, height, p, (y, t) => {
    const o = y * width
    for (let x = 0; x < width; x++) out[o + x] = grey[o + x]! <= t[x]! ? 1 : 0
  })
  return out
}

/** Window side in pixels for a side in millimetres at a resolution: odd, at least 3. */
export function windowPx(windowMm: number, pxPerMm: number): number {
  const w = Math.max(3, Math.round(windowMm * pxPerMm))
  return w % 2 === 1 ? w : w + 1
}
