// Lighting evening: remove the slow shading of a phone photo of paper (light fall-off,
// vignette, a soft shadow) before thresholding.
//
//   paper estimate P = blur(min-filter(max-filter(image)))   (square windows, same size)
//   evened = image ÷ P × 255, clamped to 0…255
//
// For dark ink on light paper, the max-filter is a greyscale dilation of the bright paper: a
// window wider than the largest solid ink area always holds some paper, so even a big filled
// disc is replaced by the paper around it and is not hollowed out by the division. The
// min-filter of the same window that follows (together: a greyscale closing) pulls the
// estimate back down to the paper level: a max-filter alone reads the brightest paper in the
// window, which under a lighting gradient is brighter than the paper under the ink; a closing
// leaves a linear or concave brightness profile unchanged. The blur then smooths the square
// windows' blocky steps.
//
// The paper estimate is smooth by construction, so it is computed on a copy shrunk to about
// 256 pixels on the short side (shrinking averages, which also calms noise before the
// max-filter, which would otherwise pick the brightest noise) and enlarged back bilinearly.
//
// The closing reads the image as extended without end by repeating its edge pixels, so a
// vignette's fall-off towards the border survives it (closingOfRepeated).
//
// Sizes: the window side is windowFraction (default 0.5) of the image's short side, so a
// solid ink area up to about half the short side across is bridged; the blur's standard
// deviation is a quarter of the window side.
//
// Sharp's dilate/erode are binary morphology (libvips morph with a 0/255 mask), so the
// greyscale max and min filters are done here with the van Herk / Gil-Werman algorithm:
// separable, rows then columns, three comparisons per pixel whatever the window.
import { scaleBilinear, scaling } from './homography'
import { blurGrey, resizeGrey } from './rawgrey'

export interface EveningOptions {
  /** 0 = no evening, 1 = full evening; linear blend of the two results. Default 1. */
  strength?: number
  /** Window side as a fraction of the image's short side. Default 0.5. */
  windowFraction?: number
  /** Short side of the shrunk copy the paper estimate is computed on. Default 256. */
  workShortSide?: number
}

export type PaperEstimateMethod =
  /** max-filter, min-filter, blur (the method used by evenLighting) */
  | 'closing'
  /** max-filter then blur, without the min-filter */
  | 'max'
  /** blur only: the naive estimate, kept for comparison in tests */
  | 'blur'

/**
 * Running maximum (or minimum) over windows of `size` (odd) centred on each sample of a line,
 * clipped at the line's ends. van Herk / Gil-Werman: split the padded line into blocks of
 * `size`, take prefix extrema forward and suffix extrema backward within each block; every
 * window then spans at most two blocks and its extremum is max(suffix[start], prefix[end]).
 */
function runningExtremum1D(
  src: Uint8Array, n: number, size: number, isMax: boolean,
  out: Uint8Array, pre: Uint8Array, suf: Uint8Array,
): void {
  const r = (size - 1) >> 1
  const neutral = isMax ? 0 : 255
  const m = n + 2 * r // padded length
  // padded index p corresponds to source index p - r
  for (let blockStart = 0; blockStart < m; blockStart += size) {
    const blockEnd = Math.min(blockStart + size, m)
    let acc = neutral
    for (let p = blockStart; p < blockEnd; p++) {
      const i = p - r
      const v = i >= 0 && i < n ? src[i]! : neutral
      acc = isMax ? (v > acc ? v : acc) : (v < acc ? v : acc)
      pre[p] = acc
    }
    acc = neutral
    for (let p = blockEnd - 1; p >= blockStart; p--) {
      const i = p - r
      const v = i >= 0 && i < n ? src[i]! : neutral
      acc = isMax ? (v > acc ? v : acc) : (v < acc ? v : acc)
      suf[p] = acc
    }
  }
  for (let i = 0; i < n; i++) {
    // window in padded coordinates: [i, i + size - 1]
    const a = suf[i]!
    const b = pre[i + size - 1]!
    out[i] = isMax ? (a > b ? a : b) : (a < b ? a : b)
  }
}

/** Each value of `into` becomes the larger (isMax) or smaller of itself and `from`'s, index by index. */
function combineInto(into: Uint8Array, from: Uint8Array, isMax: boolean): void {
  const n = into.length
  if (isMax) for (let i = 0; i < n; i++) { const a = into[i]!, b = from[i]!; if (b > a) into[i] = b }
  else for (let i = 0; i < n; i++) { const a = into[i]!, b = from[i]!; if (b < a) into[i] = b }
}

/**
 * The columns' running extremum, as runningExtremum1D on every column at once: the blocks'
 * prefix and suffix extrema are kept a whole row at a time, so memory is read row by row
 * instead of down each column.
 */
function columnsExtremum(src: Uint8Array, width: number, height: number, size: number, isMax: boolean): Uint8Array {
  const r = (size - 1) >> 1
  const neutral = isMax ? 0 : 255
  const m = height + 2 * r // padded rows; padded row p is source row p - r
  const pre = new Uint8Array(m * width)
  const suf = new Uint8Array(m * width)
  const row = (p: number) => { const i = p - r; return i >= 0 && i < height ? src.subarray(i * width, (i + 1) * width) : null }
  for (let blockStart = 0; blockStart < m; blockStart += size) {
    const blockEnd = Math.min(blockStart + size, m)
    for (let p = blockStart; p < blockEnd; p++) {
      const here = pre.subarray(p * width, (p + 1) * width), v = row(p)
      if (p > blockStart) here.set(pre.subarray((p - 1) * width, p * width))
      else here.fill(neutral)
      if (v) combineInto(here, v, isMax)
    }
    for (let p = blockEnd - 1; p >= blockStart; p--) {
      const here = suf.subarray(p * width, (p + 1) * width), v = row(p)
      if (p < blockEnd - 1) here.set(suf.subarray((p + 1) * width, (p + 2) * width))
      else here.fill(neutral)
      if (v) combineInto(here, v, isMax)
    }
  }
  // window of source row y in padded rows: [y, y + size - 1]
  const out = suf.slice(0, width * height)
  combineInto(out, pre.subarray((size - 1) * width, (size - 1 + height) * width), isMax)
  return out
}

/**
 * Greyscale max-filter (isMax) or min-filter over a size × size square window (size odd),
 * windows clipped at the image border. Returns a new buffer.
 */
export function squareExtremumFilter(
  img: Uint8Array, width: number, height: number, size: number, isMax: boolean,
): Uint8Array {
  if (size < 1 || size % 2 !== 1) throw new RangeError('The window size must be an odd whole number.')
  const pre = new Uint8Array(width + size)
  const suf = new Uint8Array(width + size)
  const tmp = new Uint8Array(width * height)
  for (let y = 0; y < height; y++) {
    const row = img.subarray(y * width, (y + 1) * width)
    runningExtremum1D(row, width, size, isMax, tmp.subarray(y * width, (y + 1) * width), pre, suf)
  }
  return columnsExtremum(tmp, width, height, size, isMax)
}

/** The image extended by `pad` pixels on every side, repeating its edge pixels. */
export function padByRepeating(img: Uint8Array, width: number, height: number, pad: number): Uint8Array {
  const W = width + 2 * pad, H = height + 2 * pad
  const out = new Uint8Array(W * H)
  for (let y = 0; y < H; y++) {
    const sy = Math.min(height - 1, Math.max(0, y - pad))
    for (let x = 0; x < W; x++) out[y * W + x] = img[sy * width + Math.min(width - 1, Math.max(0, x - pad))]!
  }
  return out
}

function crop(img: Uint8Array, width: number, pad: number, w: number, h: number): Uint8Array {
  const out = new Uint8Array(w * h)
  for (let y = 0; y < h; y++) out.set(img.subarray((y + pad) * width + pad, (y + pad) * width + pad + w), y * w)
  return out
}

function oddAtLeast1(v: number): number {
  const r = Math.max(1, Math.round(v))
  return r % 2 === 1 ? r : r + 1
}

/**
 * Greyscale closing (max-filter, then min-filter, size × size) of the image extended without
 * end by repeating its edge pixels, read on the image itself. The min-filter near the border
 * then uses windows that reach outside the image, so brightness that falls steadily towards
 * an edge (a vignette) comes through the closing as it is, instead of being replaced by the
 * brighter paper further in.
 *
 * A margin of half a window (r) is enough: the min-filter reads the max-filter at most r
 * outside, and the max-filter's window there, cut at the margin's end, still holds the edge
 * pixel that every repeated pixel beyond the margin copies.
 */
export function closingOfRepeated(img: Uint8Array, width: number, height: number, size: number): Uint8Array {
  const pad = (size - 1) / 2
  const pw = width + 2 * pad, ph = height + 2 * pad
  let padded = padByRepeating(img, width, height, pad)
  padded = squareExtremumFilter(padded, pw, ph, size, true)
  padded = squareExtremumFilter(padded, pw, ph, size, false)
  return crop(padded, pw, pad, width, height)
}

/** Estimate of the bare paper's brightness under the ink, same size as the input. */
export async function paperEstimate(
  grey: Uint8Array, width: number, height: number,
  options: Omit<EveningOptions, 'strength'> & { method?: PaperEstimateMethod } = {},
): Promise<Uint8Array> {
  const { windowFraction = 0.5, workShortSide = 256, method = 'closing' } = options
  const short = Math.min(width, height)
  const f = Math.min(1, workShortSide / short)
  const sw = Math.max(1, Math.round(width * f))
  const sh = Math.max(1, Math.round(height * f))
  const small = await resizeGrey(grey, width, height, sw, sh)
  const size = oddAtLeast1(windowFraction * Math.min(sw, sh))
  let est = small
  if (method === 'closing') est = closingOfRepeated(est, sw, sh, size)
  // A max-filter alone gives the same on the image with or without the repeated pixels: a
  // window cut at the image's edge still holds the edge pixel they copy.
  else if (method === 'max') est = squareExtremumFilter(est, sw, sh, size, true)
  est = await blurGrey(est, sw, sh, size / 4)
  // The estimate is smooth: bilinear enlargement loses nothing and is quick.
  return sw === width && sh === height ? est : scaleBilinear(est, sw, sh, scaling(sw / width, sh / height), width, height)
}

/** Divide the image by its paper estimate, blended with the original by strength. */
export async function evenLighting(
  grey: Uint8Array, width: number, height: number,
  options: EveningOptions & { method?: PaperEstimateMethod } = {},
): Promise<Uint8Array> {
  const strength = Math.min(1, Math.max(0, options.strength ?? 1))
  if (strength === 0) return grey.slice()
  const paper = await paperEstimate(grey, width, height, options)
  const out = new Uint8Array(grey.length)
  const keep = 1 - strength
  for (let i = 0; i < grey.length; i++) {
    const g = grey[i]!
    const p = paper[i]! || 1
    let e = (g * 255) / p
    if (e > 255) e = 255
    const v = keep * g + strength * e
    out[i] = v >= 255 ? 255 : Math.round(v)
  }
  return out
}
