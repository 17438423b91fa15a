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
// The filters run on the image extended by one window on every side, repeating its edge
// pixels, so a vignette's fall-off towards the border survives the closing.
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
 * Running maximum over windows of `size` (odd) centred on each pixel, along the rows
 * (vertical = false) or down the columns (vertical = true), clipped at the image's edges.
 * van Herk / Gil-Werman: split the line, padded by (size − 1) / 2 of zeros at each end, into
 * blocks of `size`, take prefix maxima forward and suffix maxima backward within each block;
 * every window then spans at most two blocks and its maximum is max(suffix[start],
 * prefix[end]). Down the columns, whole rows are taken at a time, so memory is read in order.
 */
function runningMax(src: Uint8Array, width: number, height: number, size: number, vertical: boolean): Uint8Array {
  const r = (size - 1) >> 1
  // A line is `count` samples `step` apart; `lanes` lines side by side, `stride` apart.
  const count = vertical ? height : width, lanes = vertical ? width : height
  const step = vertical ? width : 1, stride = vertical ? 1 : width
  const m = count + 2 * r
  // Padded sample p of lane l sits at p · lanes + l (lanes innermost, zeros in the padding).
  const pre = new Uint8Array(m * lanes), suf = new Uint8Array(m * lanes)
  for (let i = 0; i < count; i++) {
    const o = (i + r) * lanes
    for (let l = 0; l < lanes; l++) pre[o + l] = src[l * stride + i * step]!
  }
  suf.set(pre)
  for (let start = 0; start < m; start += size) {
    const end = Math.min(start + size, m)
    for (let p = start + 1; p < end; p++) {
      const o = p * lanes, q = o - lanes
      for (let l = 0; l < lanes; l++) { const a = pre[q + l]!, b = pre[o + l]!; if (a > b) pre[o + l] = a }
    }
    for (let p = end - 2; p >= start; p--) {
      const o = p * lanes, q = o + lanes
      for (let l = 0; l < lanes; l++) { const a = suf[q + l]!, b = suf[o + l]!; if (a > b) suf[o + l] = a }
    }
  }
  const out = new Uint8Array(width * height)
  for (let i = 0; i < count; i++) {
    const s = i * lanes, e = (i + size - 1) * lanes
    for (let l = 0; l < lanes; l++) {
      const a = suf[s + l]!, b = pre[e + l]!
      out[l * stride + i * step] = a > b ? a : b
    }
  }
  return out
}

function invert(img: Uint8Array): Uint8Array {
  for (let i = 0; i < img.length; i++) img[i] = 255 - img[i]!
  return img
}

/**
 * Greyscale max-filter (isMax) or min-filter over a size × size square window (size odd),
 * windows clipped at the image border. Returns a new buffer. The min-filter is the max-filter
 * of the inverted image, inverted back.
 */
export function squareExtremumFilter(
  img: Uint8Array, width: number, height: number, size: number, isMax: boolean,
): Uint8Array {
  if (size < 1 || size % 2 !== 1) throw new RangeError('The window size must be an odd whole number.')
  const input = isMax ? img : invert(img.slice())
  const out = runningMax(runningMax(input, width, height, size, false), width, height, size, true)
  return isMax ? out : invert(out)
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
  if (method !== 'blur') {
    // Filter the image extended by one window on each side (edge pixels repeated), so the
    // min-filter near the border can use windows that reach outside the image: brightness
    // that falls steadily towards an edge (a vignette) then comes through the closing as it
    // is, instead of being replaced by the brighter paper further in.
    const pad = size
    const pw = sw + 2 * pad, ph = sh + 2 * pad
    let padded = padByRepeating(est, sw, sh, pad)
    padded = squareExtremumFilter(padded, pw, ph, size, true)
    if (method === 'closing') padded = squareExtremumFilter(padded, pw, ph, size, false)
    est = crop(padded, pw, pad, sw, sh)
  }
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
