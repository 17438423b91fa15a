// Millimetres, CSS pixels and bitmap pixels. Shared by the server pipeline and the browser.
//
// Two kinds of pixel appear in this product and must not be confused:
//  - a CSS pixel ("px" in SVG and CSS), a fixed physical length: 1in = 96px = 25.4mm;
//  - a bitmap pixel of the prepared bitmap, whose size depends on the chosen resolution
//    (pxPerMm), i.e. on the decal's target width.

/** Millimetres in one inch (exact by definition of the international inch). */
export const MM_PER_INCH = 25.4
/** CSS pixels in one inch (exact by definition of the CSS reference pixel's anchor). */
export const CSS_PX_PER_INCH = 96

/** Bitmap pixels for a length in mm at a resolution of pxPerMm. */
export function mmToPx(mm: number, pxPerMm: number): number {
  return mm * pxPerMm
}

/** Millimetres for a length in bitmap pixels at a resolution of pxPerMm. */
export function pxToMm(px: number, pxPerMm: number): number {
  return px / pxPerMm
}

/** Millimetres for a length in CSS pixels (96 per inch). */
export function cssPxToMm(cssPx: number): number {
  return (cssPx * MM_PER_INCH) / CSS_PX_PER_INCH
}

/** CSS pixels (96 per inch) for a length in millimetres. */
export function mmToCssPx(mm: number): number {
  return (mm * CSS_PX_PER_INCH) / MM_PER_INCH
}

/**
 * Default pixel cap of the prepared bitmap: 16 million pixels. Reasons: it is a 400 × 400 mm
 * decal at 10 px/mm, larger than any sheet of film a small lab laser takes; the pipeline keeps
 * a few bytes to a few tens of bytes per pixel alive at once (grey image, bitmap, the tracer's
 * own copies, distance transform), so one job stays well under a gigabyte; and tracing time
 * grows with the pixel count, so the cap also bounds the time of a job.
 */
export const DEFAULT_MAX_PIXELS = 16_000_000
/** The design gets at least this many bitmap pixels per millimetre when the source allows. */
export const DEFAULT_MIN_PX_PER_MM = 10
/**
 * Finer than this brings no detail a laser can cut (pixels of about 0.08 mm, below a diode
 * laser's kerf of the order of 0.1 mm — from memory) and only costs time: every stage after
 * decoding grows with the pixel count, so a finer source is shrunk to this.
 */
export const DEFAULT_MAX_PX_PER_MM = 12
/**
 * Never enlarge a source by more than this factor: interpolation invents no detail, a blurrier
 * edge beyond 4× only costs time, and the tracer already fits its curves between pixels.
 */
export const DEFAULT_MAX_UPSCALE = 4

export interface PreparedSizeInput {
  sourceWidthPx: number
  sourceHeightPx: number
  targetWidthMm: number
  minPxPerMm?: number
  maxPxPerMm?: number
  maxUpscale?: number
  maxPixels?: number
}

export interface PreparedSize {
  widthPx: number
  heightPx: number
  /** Exact resolution of the prepared bitmap: widthPx / targetWidthMm. */
  pxPerMm: number
  heightMm: number
  /** True when the pixel cap lowered the resolution. */
  capped: boolean
  /** Prepared width ÷ source width (1 = no resampling). */
  scale: number
}

/**
 * Pixel size of the prepared bitmap for a source of the given size shown at targetWidthMm.
 *
 * Rule, in order:
 *  1. the source's own resolution at the target width is r = sourceWidthPx / targetWidthMm;
 *  2. the wanted resolution is r clamped to [minPxPerMm, maxPxPerMm] (default 10…20 px/mm):
 *     a coarse source is enlarged, a very fine one (a 12 MP photo of a small decal) shrunk;
 *  3. enlargement is limited to maxUpscale (default 4×), even if that leaves the design
 *     below minPxPerMm: a tiny source stays honest rather than absurdly blown up;
 *  4. if widthPx × heightPx would exceed maxPixels, both sides shrink by the same factor
 *     until it fits (capped = true).
 * Sides are whole pixels, at least 1. pxPerMm is then recomputed from the whole-pixel width,
 * so widthPx / pxPerMm is exactly targetWidthMm.
 */
export function preparedSize(input: PreparedSizeInput): PreparedSize {
  const {
    sourceWidthPx, sourceHeightPx, targetWidthMm,
    minPxPerMm = DEFAULT_MIN_PX_PER_MM,
    maxPxPerMm = DEFAULT_MAX_PX_PER_MM,
    maxUpscale = DEFAULT_MAX_UPSCALE,
    maxPixels = DEFAULT_MAX_PIXELS,
  } = input
  if (!(sourceWidthPx >= 1 && sourceHeightPx >= 1)) throw new RangeError('The source must be at least 1 × 1 pixel.')
  if (!(targetWidthMm > 0) || !Number.isFinite(targetWidthMm)) throw new RangeError('The target width must be a positive number of millimetres.')
  if (!(minPxPerMm > 0 && maxPxPerMm >= minPxPerMm)) throw new RangeError('Resolution limits must satisfy 0 < min ≤ max.')
  if (!(maxPixels >= 1)) throw new RangeError('The pixel cap must be at least 1.')

  const sourcePxPerMm = sourceWidthPx / targetWidthMm
  let wanted = Math.min(Math.max(sourcePxPerMm, minPxPerMm), maxPxPerMm)
  wanted = Math.min(wanted, sourcePxPerMm * maxUpscale)
  let scale = wanted / sourcePxPerMm
  let widthPx = Math.max(1, Math.round(sourceWidthPx * scale))
  let heightPx = Math.max(1, Math.round(sourceHeightPx * scale))
  let capped = false
  if (widthPx * heightPx > maxPixels) {
    capped = true
    const shrink = Math.sqrt(maxPixels / (sourceWidthPx * scale * sourceHeightPx * scale))
    scale *= shrink
    widthPx = Math.max(1, Math.floor(sourceWidthPx * scale))
    heightPx = Math.max(1, Math.floor(sourceHeightPx * scale))
    while (widthPx * heightPx > maxPixels) {
      if (widthPx >= heightPx && widthPx > 1) widthPx--
      else heightPx--
    }
  }
  const pxPerMm = widthPx / targetWidthMm
  return { widthPx, heightPx, pxPerMm, heightMm: heightPx / pxPerMm, capped, scale: widthPx / sourceWidthPx }
}
