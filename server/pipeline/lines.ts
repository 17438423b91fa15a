// Ruled and grid lines of the paper: finding them, and taking them out of a prepared bitmap.
//
// What marks a paper line, as opposed to a stroke of the drawing: it is thin, straight, runs
// across (nearly) the whole sheet, and comes with others at one regular spacing. So, for each
// direction (rows, then columns):
//
//  1. Slope. Lines of a sheet scanned a little askew are not quite level. The darkness is
//     summed along lines of each slope from −3° to 3° (coarse, then fine); the right slope
//     gives the sharpest profile (largest sum of squared steps between neighbouring lines),
//     as in the projection-profile skew estimates of document scanners.
//  2. Peaks. The profile minus its running minimum over a few pixels (a top-hat) leaves the
//     thin peaks; wide bumps of the drawing stay low.
//  3. Regular spacing. The spacing is the lag with the highest autocorrelation of the top-hat
//     profile; peaks that sit on that lattice (within an eighth of the spacing) are candidates.
//  4. Across the whole sheet. A candidate counts only if, along its length, at least 70 % of
//     the positions are darker than the paper between the lines: a long stroke of the
//     drawing does not cross the whole sheet, a paper line does (the drawing over it only
//     makes it darker).
//  A family needs four such lines at one spacing.
//
// Removal works on the 1-bit bitmap: along each line, the band of rows the line occupies is
// cleared, except where the ink goes on beyond the band on both sides (a stroke of the drawing
// crosses the line) or far beyond it on one side (a shape of the drawing lies along the line,
// or a stroke ends on it).

import { halveGrey } from './rawgrey'

export type LineOrientation = 'horizontal' | 'vertical'

export interface LineFamily {
  orientation: LineOrientation
  /**
   * True for evenly spaced lines (ruled or grid paper); false for one long line on its own
   * (a margin line), which is told apart only by its colour, never taken out by its shape.
   */
  regular: boolean
  /** Horizontal lines: y = offset + slope · x; vertical lines: x = offset + slope · y (px). */
  slope: number
  /** Offsets of every line found, ascending, px. */
  offsets: number[]
  /** Spacing between neighbouring lines, px. */
  period: number
  /** Width of a line across its length (full width at half its darkness), px. */
  thickness: number
  /** How much darker than the paper between them the lines are, in darkness levels (0…255). */
  contrast: number
  /** Set when the lines' colour is read as paper: nothing of them is left to take out. */
  dropped?: boolean
}

/** A view of an image along one direction: `along` runs along the lines, `across` over them. */
interface View { along: number, across: number, at: (a: number, c: number) => number }

function view(width: number, height: number, o: LineOrientation): View {
  return o === 'horizontal'
    ? { along: width, across: height, at: (a, c) => c * width + a }
    : { along: height, across: width, at: (a, c) => a * width + c }
}

/** The image with rows and columns swapped (vertical lines become horizontal). */
function transpose(img: Uint8Array, width: number, height: number): Uint8Array {
  const out = new Uint8Array(width * height)
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) out[x * height + y] = img[y * width + x]!
  return out
}

/** Each row's running sums: row y's pixels 0 … x − 1 add up to sums[y · (width + 1) + x]. */
function rowSums(img: Uint8Array, width: number, height: number): Int32Array {
  const sums = new Int32Array((width + 1) * height)
  for (let y = 0; y < height; y++) {
    const o = y * width, q = y * (width + 1)
    let acc = 0
    for (let x = 0; x < width; x++) { acc += img[o + x]!; sums[q + x + 1] = acc }
  }
  return sums
}

/**
 * Sums and pixel counts along rows of the given slope; index r is the line through (0, r − pad).
 * Along such a line the row changes only every 1 / |slope| pixels, so each stretch of one
 * row is added at once from the row's running sums.
 */
function sumsAlong(sums: Int32Array, width: number, height: number, slope: number, sum: Int32Array | Float64Array, cnt: Int32Array | Float64Array): { len: number, pad: number } {
  const pad = Math.ceil(Math.abs(slope) * width) + 1
  const len = height + 2 * pad
  sum.fill(0, 0, len); cnt.fill(0, 0, len)
  for (let xa = 0; xa < width;) {
    const sh = pad - Math.round(slope * xa)
    let xb = xa + 1
    while (xb < width && pad - Math.round(slope * xb) === sh) xb++
    const n = xb - xa
    for (let y = 0, q = 0; y < height; y++, q += width + 1) {
      sum[y + sh]! += sums[q + xb]! - sums[q + xa]!
      cnt[y + sh]! += n
    }
    xa = xb
  }
  return { len, pad }
}

/** Mean darkness along rows of the given slope; index r is the line through (0, r − pad). */
function meanProfile(img: Uint8Array, width: number, height: number, slope: number): { profile: Float64Array, pad: number } {
  const maxLen = height + 2 * (Math.ceil(Math.abs(slope) * width) + 1)
  const sum = new Float64Array(maxLen), cnt = new Float64Array(maxLen)
  const { len, pad } = sumsAlong(rowSums(img, width, height), width, height, slope, sum, cnt)
  const profile = new Float64Array(len)
  for (let r = 0; r < len; r++) profile[r] = cnt[r]! > 0.5 * width ? sum[r]! / cnt[r]! : 0
  return { profile, pad }
}

/** Sum of squared steps of the mean profile along rows of the given slope (integer sums: fast). */
function slopeScore(sums: Int32Array, width: number, height: number, slope: number, sum: Int32Array, cnt: Int32Array): number {
  const { len } = sumsAlong(sums, width, height, slope, sum, cnt)
  let score = 0, prev = -1
  for (let r = 0; r < len; r++) {
    const running = cnt[r]!
    if (running <= 0.5 * width) { prev = -1; continue }
    const v = sum[r]! / running
    if (prev >= 0) score += (v - prev) * (v - prev)
    prev = v
  }
  return score
}

function bestSlope(img: Uint8Array, width: number, height: number): number {
  // Coarse on a quarter-size copy, fine on a half-size one.
  const half = halveGrey(img, width, height)
  const quarter = halveGrey(half.img, half.width, half.height)
  const halfSums = rowSums(half.img, half.width, half.height), quarterSums = rowSums(quarter.img, quarter.width, quarter.height)
  const maxPad = Math.ceil(Math.tan((3.5 * Math.PI) / 180) * half.width) + 1
  const sum = new Int32Array(half.height + 2 * maxPad + 1)
  const cnt = new Int32Array(half.height + 2 * maxPad + 2)
  let best = 0, bestScore = -1
  // From the middle outwards; a neighbour must do clearly better to move away from it.
  const search = (im: typeof half, sums: Int32Array, centre: number, reach: number, step: number) => {
    best = centre
    bestScore = slopeScore(sums, im.width, im.height, Math.tan((centre * Math.PI) / 180), sum, cnt)
    for (let k = 1; k * step <= reach + 1e-9; k++) {
      for (const deg of [centre - k * step, centre + k * step]) {
        const score = slopeScore(sums, im.width, im.height, Math.tan((deg * Math.PI) / 180), sum, cnt)
        if (score > 1.001 * bestScore) { bestScore = score; best = deg }
      }
    }
  }
  search(quarter, quarterSums, 0, 3, 0.5)
  search(half, halfSums, best, 0.3, 0.1)
  search(half, halfSums, best, 0.05, 0.05)
  return Math.tan((best * Math.PI) / 180)
}

function topHat(p: Float64Array, k: number): Float64Array {
  const out = new Float64Array(p.length)
  for (let i = 0; i < p.length; i++) {
    let m = Infinity
    for (let j = Math.max(0, i - k); j <= Math.min(p.length - 1, i + k); j++) if (p[j]! < m) m = p[j]!
    out[i] = p[i]! - m
  }
  return out
}

/**
 * The spacing: the smallest lag whose autocorrelation comes close to the best one (a lattice
 * correlates as well at twice and three times its spacing; the spacing is the first).
 */
function bestPeriod(th: Float64Array, minLag: number, maxLag: number): number {
  let mean = 0
  for (const v of th) mean += v
  mean /= th.length
  const ac = new Float64Array(maxLag + 2)
  let best = 0
  for (let lag = minLag; lag <= maxLag + 1; lag++) {
    let s = 0
    for (let i = 0; i + lag < th.length; i++) s += (th[i]! - mean) * (th[i + lag]! - mean)
    ac[lag] = s / (th.length - lag)
    if (lag <= maxLag && ac[lag]! > best) best = ac[lag]!
  }
  if (!(best > 0)) return 0
  for (let lag = minLag; lag <= maxLag; lag++) {
    if (ac[lag]! >= 0.7 * best && ac[lag]! >= ac[lag - 1]! && ac[lag]! >= ac[lag + 1]!) {
      // between whole lags: the top of the parabola through the three values
      const a = ac[lag - 1]!, b = ac[lag]!, c = ac[lag + 1]!
      const den = a - 2 * b + c
      return den < 0 ? lag + (0.5 * (a - c)) / den : lag
    }
  }
  return 0
}

function quantile(values: Uint8Array, n: number, q: number): number {
  const hist = new Uint32Array(256)
  for (let i = 0; i < n; i++) hist[values[i]!]!++
  let acc = 0
  for (let v = 0; v < 256; v++) { acc += hist[v]!; if (acc >= q * n) return v }
  return 255
}

/**
 * Darkness a line reaches along most of its length: for every position along the line the
 * darkest of the rows within one pixel, then the level that 70 % of the positions reach.
 */
function lineLevel(img: Uint8Array, width: number, height: number, slope: number, offset: number, buf: Uint8Array, share = 0.7): number {
  let n = 0
  for (let x = 0; x < width; x++) {
    const y0 = Math.round(offset + slope * x)
    let m = -1
    for (let y = y0 - 1; y <= y0 + 1; y++) if (y >= 0 && y < height) { const v = img[y * width + x]!; if (v > m) m = v }
    if (m >= 0) buf[n++] = m
  }
  return n < 0.5 * width ? 0 : quantile(buf, n, 1 - share)
}

/** Full width at half maximum of a top-hat peak, px. */
function peakWidth(th: Float64Array, c: number): number {
  const half = th[c]! / 2
  let a = c, b = c
  while (a > 0 && th[a - 1]! >= half) a--
  while (b + 1 < th.length && th[b + 1]! >= half) b++
  return b - a + 1
}

/**
 * Long lines on their own: thin peaks, dark along at least 90 % of the sheet's width, that
 * are not part of the regular family.
 */
function singleLines(img: Uint8Array, width: number, height: number, slope: number, th: Float64Array, pad: number, noise: number, taken: number[], orientation: LineOrientation): LineFamily[] {
  const buf = new Uint8Array(width)
  const out: LineFamily[] = []
  for (let i = 1; i + 1 < th.length; i++) {
    if (!(th[i]! >= 4 * noise && th[i]! >= th[i - 1]! && th[i]! > th[i + 1]!)) continue
    const offset = i - pad
    if (taken.some((o) => Math.abs(o - offset) < 4)) continue
    const thickness = peakWidth(th, i)
    if (thickness > 4) continue
    const line = lineLevel(img, width, height, slope, offset, buf, 0.9)
    const between = Math.max(lineLevel(img, width, height, slope, offset - 3 * thickness - 2, buf, 0.9), lineLevel(img, width, height, slope, offset + 3 * thickness + 2, buf, 0.9))
    if (line - between >= 8) out.push({ orientation, regular: false, slope, offsets: [offset], period: 0, thickness, contrast: line - between })
  }
  return out
}

/** Horizontal lines (for vertical ones, the caller transposes the image): a regular family, and single lines. */
function findLines(img: Uint8Array, width: number, height: number, orientation: LineOrientation): LineFamily[] {
  if (width < 24 || height < 24) return []
  const slope = bestSlope(img, width, height)
  const { profile, pad } = meanProfile(img, width, height, slope)
  const th = topHat(profile, 4)
  const sorted = [...th].sort((a, b) => a - b)
  const noise = Math.max(0.5, sorted[Math.floor(sorted.length / 2)]! * 1.5)
  const family = regularFamily(img, width, height, orientation, slope, th, pad, noise)
  return [...(family ? [family] : []), ...singleLines(img, width, height, slope, th, pad, noise, family?.offsets ?? [], orientation)]
}

function regularFamily(img: Uint8Array, width: number, height: number, orientation: LineOrientation, slope: number, th: Float64Array, pad: number, noise: number): LineFamily | null {
  const period = bestPeriod(th, 5, Math.floor(height / 4))
  if (!period) return null
  // Peaks: local maxima of the top-hat above the noise.
  const peaks: number[] = []
  for (let i = 1; i + 1 < th.length; i++) if (th[i]! >= 2 * noise && th[i]! >= th[i - 1]! && th[i]! > th[i + 1]!) peaks.push(i)
  if (peaks.length < 4) return null
  // Phase: the one that puts most peak strength on the lattice.
  const tol = Math.max(1, period / 8)
  let bestPhase = 0, bestHits = -1
  for (const p of peaks) {
    let hits = 0
    for (const q of peaks) {
      const k = Math.round((q - p) / period)
      if (Math.abs(q - p - k * period) <= tol) hits += th[q]!
    }
    if (hits > bestHits) { bestHits = hits; bestPhase = p }
  }
  // Fit the lattice (phase and spacing) by least squares, reassigning peaks as it improves.
  let phase = bestPhase, spacing = period
  let cells: [number, number][] = []
  for (let round = 0; round < 4; round++) {
    const byCell = new Map<number, number>()
    for (const q of peaks) {
      const k = Math.round((q - phase) / spacing)
      if (Math.abs(q - phase - k * spacing) > tol) continue
      const cur = byCell.get(k)
      if (cur === undefined || th[q]! > th[cur]!) byCell.set(k, q)
    }
    cells = [...byCell.entries()].sort((a, b) => a[0] - b[0])
    if (cells.length < 4) return null
    let sk = 0, sy = 0, skk = 0, sky = 0
    for (const [k, q] of cells) { sk += k; sy += q; skk += k * k; sky += k * q }
    const m = cells.length
    const den = m * skk - sk * sk
    if (den === 0) return null
    spacing = (m * sky - sk * sy) / den
    phase = (sy - spacing * sk) / m
  }
  const refined = spacing
  const buf = new Uint8Array(width)
  const offsets: number[] = []
  let contrastSum = 0
  for (const [, q] of cells) {
    const offset = q - pad
    const line = lineLevel(img, width, height, slope, offset, buf)
    const between = Math.max(
      lineLevel(img, width, height, slope, offset - refined / 2, buf),
      lineLevel(img, width, height, slope, offset + refined / 2, buf),
    )
    if (line - between >= 4) { offsets.push(offset); contrastSum += line - between }
  }
  if (offsets.length < 4) return null
  // Thickness: full width at half maximum of the mean top-hat peak.
  let thick = 0
  for (const o of offsets) thick += peakWidth(th, Math.round(o + pad))
  const thickness = thick / offsets.length
  // Paper lines are thin next to their spacing.
  if (thickness > refined / 4) return null
  return { orientation, regular: true, slope, offsets, period: refined, thickness, contrast: contrastSum / offsets.length }
}

/** Ruled or grid lines in a darkness image (0 = paper, higher = darker), both directions. */
export function findPaperLines(darkness: Uint8Array, width: number, height: number): LineFamily[] {
  const out: LineFamily[] = []
  out.push(...findLines(darkness, width, height, 'horizontal'))
  out.push(...findLines(transpose(darkness, width, height), height, width, 'vertical'))
  return out
}

/**
 * The family on another grid of the same sheet: continuous coordinates (pixel centres at
 * whole numbers plus ½) map as p′ = scale · p + (tx, ty).
 */
export function mapFamily(f: LineFamily, scale: number, tx: number, ty: number): LineFamily {
  const tAlong = f.orientation === 'horizontal' ? tx : ty
  const tAcross = f.orientation === 'horizontal' ? ty : tx
  // A line through pixel centres: across + ½ = (offset + ½) + slope · (along + ½ − ½).
  return {
    ...f,
    offsets: f.offsets.map((o) => scale * (o + 0.5) - 0.5 + tAcross + f.slope * (0.5 - tAlong - 0.5 * scale)),
    period: f.period * scale,
    thickness: f.thickness * scale,
  }
}

/**
 * Clear a family's lines from a 1-bit bitmap (1 = ink) in place, keeping the ink where the
 * drawing crosses them. Each line's band is measured on the bitmap itself, within a few
 * pixels of where the family puts it. Returns how many lines were found and cleared.
 */
export function removeLines(bitmap: Uint8Array, width: number, height: number, f: LineFamily): number {
  const v = view(width, height, f.orientation)
  const reach = Math.ceil(f.thickness + 3)
  const span = 2 * reach + 1
  const frac = new Float64Array(span)
  let cleared = 0
  for (const offset of f.offsets) {
    // Share of ink in each row of the band around the expected line.
    frac.fill(0)
    let n = 0
    for (let a = 0; a < v.along; a++) {
      const c0 = Math.round(offset + f.slope * a)
      if (c0 < -reach || c0 >= v.across + reach) continue
      n++
      for (let k = -reach; k <= reach; k++) {
        const c = c0 + k
        if (c >= 0 && c < v.across && bitmap[v.at(a, c)]) frac[k + reach]!++
      }
    }
    if (!n) continue
    let peak = 0
    for (let k = 0; k < span; k++) { frac[k]! /= n; if (frac[k]! > frac[peak]!) peak = k }
    if (frac[peak]! < 0.3) continue
    // The band: the line's own width around its darkest row (the drawing lying along the
    // line would widen a band measured from the ink alone), one pixel more on each side.
    const half = Math.max(1, Math.ceil(f.thickness / 2))
    const lo = peak - reach - half, hi = peak - reach + half
    cleared++
    const solid = hi - lo + 1 // ink going on this far beyond the band is a shape, not a line's fringe
    const run = (a: number, from: number, step: number) => {
      let n = 0
      for (let c = from; c >= 0 && c < v.across && n < solid && bitmap[v.at(a, c)] === 1; c += step) n++
      return n
    }
    for (let a = 0; a < v.along; a++) {
      const c0 = Math.round(offset + f.slope * a)
      const before = run(a, c0 + lo - 1, -1), after = run(a, c0 + hi + 1, 1)
      // A stroke crosses here, or a shape of the drawing lies along the line: keep.
      if ((before > 0 && after > 0) || before >= solid || after >= solid) continue
      for (let c = Math.max(0, c0 + lo); c <= Math.min(v.across - 1, c0 + hi); c++) bitmap[v.at(a, c)] = 0
    }
  }
  return cleared
}
