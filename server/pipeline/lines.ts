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
// cleared wherever the ink does not continue beyond the band on both sides; where a stroke of
// the drawing crosses the line, the ink continues, and the crossing stays.

export type LineOrientation = 'horizontal' | 'vertical'

export interface LineFamily {
  orientation: LineOrientation
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
}

/** A view of an image along one direction: `along` runs along the lines, `across` over them. */
interface View { along: number, across: number, at: (a: number, c: number) => number }

function view(img: Uint8Array, width: number, height: number, o: LineOrientation): View {
  return o === 'horizontal'
    ? { along: width, across: height, at: (a, c) => c * width + a }
    : { along: height, across: width, at: (a, c) => a * width + c }
}

/** Mean darkness along lines of the given slope; index r is the line through (0, r − pad). */
function meanProfile(img: Uint8Array, v: View, slope: number, step: number): { profile: Float64Array, pad: number } {
  const pad = Math.ceil(Math.abs(slope) * v.along) + 1
  const len = v.across + 2 * pad
  const sum = new Float64Array(len)
  const cnt = new Float64Array(len)
  for (let c = 0; c < v.across; c++) {
    for (let a = 0; a < v.along; a += step) {
      const r = Math.round(c - slope * a) + pad
      sum[r]! += img[v.at(a, c)]!
      cnt[r]!++
    }
  }
  const profile = new Float64Array(len)
  for (let r = 0; r < len; r++) profile[r] = cnt[r]! > 0.5 * (v.along / step) ? sum[r]! / cnt[r]! : 0
  return { profile, pad }
}

function sharpness(p: Float64Array): number {
  let s = 0
  for (let i = 1; i < p.length; i++) { const d = p[i]! - p[i - 1]!; s += d * d }
  return s
}

function bestSlope(img: Uint8Array, v: View): number {
  const step = Math.max(1, Math.floor(v.along / 400))
  let best = 0, bestScore = -1
  const tryDeg = (deg: number) => {
    const s = Math.tan((deg * Math.PI) / 180)
    const score = sharpness(meanProfile(img, v, s, step).profile)
    if (score > bestScore) { bestScore = score; best = deg }
  }
  for (let deg = -3; deg <= 3.0001; deg += 0.25) tryDeg(deg)
  const coarse = best
  for (let deg = coarse - 0.2; deg <= coarse + 0.2001; deg += 0.05) tryDeg(deg)
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

function bestPeriod(th: Float64Array, minLag: number, maxLag: number): number {
  let mean = 0
  for (const v of th) mean += v
  mean /= th.length
  let best = 0, bestScore = 0
  for (let lag = minLag; lag <= maxLag; lag++) {
    let s = 0
    for (let i = 0; i + lag < th.length; i++) s += (th[i]! - mean) * (th[i + lag]! - mean)
    s /= th.length - lag
    if (s > bestScore) { bestScore = s; best = lag }
  }
  return best
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
function lineLevel(img: Uint8Array, v: View, slope: number, offset: number, buf: Uint8Array): number {
  let n = 0
  for (let a = 0; a < v.along; a++) {
    const c0 = Math.round(offset + slope * a)
    let m = -1
    for (let c = c0 - 1; c <= c0 + 1; c++) if (c >= 0 && c < v.across) { const x = img[v.at(a, c)]!; if (x > m) m = x }
    if (m >= 0) buf[n++] = m
  }
  return n < 0.5 * v.along ? 0 : quantile(buf, n, 0.3)
}

function findFamily(img: Uint8Array, width: number, height: number, orientation: LineOrientation): LineFamily | null {
  const v = view(img, width, height, orientation)
  if (v.across < 24 || v.along < 24) return null
  const slope = bestSlope(img, v)
  const { profile, pad } = meanProfile(img, v, slope, 1)
  const th = topHat(profile, 4)
  const period = bestPeriod(th, 5, Math.floor(v.across / 4))
  if (!period) return null
  // Peaks: local maxima of the top-hat above the noise.
  const sorted = [...th].sort((a, b) => a - b)
  const noise = Math.max(0.5, sorted[Math.floor(sorted.length / 2)]! * 1.5)
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
  const onLattice = peaks.filter((q) => Math.abs(q - bestPhase - Math.round((q - bestPhase) / period) * period) <= tol)
  // Keep the strongest peak within each lattice cell.
  const byCell = new Map<number, number>()
  for (const q of onLattice) {
    const k = Math.round((q - bestPhase) / period)
    const cur = byCell.get(k)
    if (cur === undefined || th[q]! > th[cur]!) byCell.set(k, q)
  }
  // Refine the spacing by least squares over the lattice cells, then check each line across the sheet.
  const cells = [...byCell.entries()].sort((a, b) => a[0] - b[0])
  if (cells.length < 4) return null
  let sk = 0, sy = 0, skk = 0, sky = 0
  for (const [k, q] of cells) { sk += k; sy += q; skk += k * k; sky += k * q }
  const m = cells.length
  const refined = (m * sky - sk * sy) / (m * skk - sk * sk)
  const buf = new Uint8Array(v.along)
  const offsets: number[] = []
  let contrastSum = 0
  for (const [, q] of cells) {
    const offset = q - pad
    const line = lineLevel(img, v, slope, offset, buf)
    const between = Math.max(
      lineLevel(img, v, slope, offset - refined / 2, buf),
      lineLevel(img, v, slope, offset + refined / 2, buf),
    )
    if (line - between >= 4) { offsets.push(offset); contrastSum += line - between }
  }
  if (offsets.length < 4) return null
  // Thickness: full width at half maximum of the mean top-hat peak.
  let thick = 0
  for (const o of offsets) {
    const c = Math.round(o + pad)
    const half = th[c]! / 2
    let a = c, b = c
    while (a > 0 && th[a - 1]! >= half) a--
    while (b + 1 < th.length && th[b + 1]! >= half) b++
    thick += b - a + 1
  }
  const thickness = thick / offsets.length
  // Paper lines are thin next to their spacing.
  if (thickness > refined / 4) return null
  return { orientation, slope, offsets, period: refined, thickness, contrast: contrastSum / offsets.length }
}

/** Ruled or grid lines in a darkness image (0 = paper, higher = darker), both directions. */
export function findPaperLines(darkness: Uint8Array, width: number, height: number): LineFamily[] {
  const out: LineFamily[] = []
  for (const o of ['horizontal', 'vertical'] as const) {
    const f = findFamily(darkness, width, height, o)
    if (f) out.push(f)
  }
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
  const v = view(bitmap, width, height, f.orientation)
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
    let lo = peak, hi = peak
    while (lo > 0 && frac[lo - 1]! >= 0.4 * frac[peak]!) lo--
    while (hi + 1 < span && frac[hi + 1]! >= 0.4 * frac[peak]!) hi++
    lo -= reach + 1; hi -= reach - 1 // band relative to the line's centre, one pixel wider each side
    cleared++
    for (let a = 0; a < v.along; a++) {
      const c0 = Math.round(offset + f.slope * a)
      const before = c0 + lo - 1, after = c0 + hi + 1
      const inkBefore = before >= 0 && before < v.across && bitmap[v.at(a, before)] === 1
      const inkAfter = after >= 0 && after < v.across && bitmap[v.at(a, after)] === 1
      if (inkBefore && inkAfter) continue // a stroke crosses here
      for (let c = Math.max(0, c0 + lo); c <= Math.min(v.across - 1, c0 + hi); c++) bitmap[v.at(a, c)] = 0
    }
  }
  return cleared
}
