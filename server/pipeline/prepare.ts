// The prepared bitmap: from an uploaded source to a 1-bit ink/paper bitmap at the resolution
// the decal's target width asks for.
//
// Order: decode (first frame of an animation) → turn upright by the orientation tag → crop →
// R′G′B′A 8-bit → greyscale with the named luma (alpha flattened onto white) → resample to
// the prepared size → lighting evening (optional) → threshold (automatic Otsu or manual) →
// swap ink and paper (optional).
//
// Resampling comes before lighting evening and threshold so both work at the prepared
// resolution: the result is the same as evening the full-size source (the paper estimate is
// smooth and computed on a shrunk copy either way), at a fraction of the cost for large
// photos. Shrinking uses a Lanczos-3 kernel, enlarging a cubic one (less ringing at edges).
import sharp, { type Metadata, type OutputInfo } from 'sharp'
import { preparedSize, type PreparedSize } from '../../shared/utils/units'
import { PrepareError } from './errors'
import { evenLighting } from './lighting'
import { toGrey } from './luma'
import { resizeGrey } from './rawgrey'
import { histogram as makeHistogram, otsuThreshold } from './otsu'
import { parseSettings, type PipelineSettings, type PipelineSettingsInput } from '../../shared/utils/settings'

export interface PrepareOptions {
  minPxPerMm?: number
  maxPxPerMm?: number
  maxUpscale?: number
  maxPixels?: number
  /** Largest source accepted, in pixels (decoded size). Default 100 million. */
  maxSourcePixels?: number
  /** Encode the PNG for speed rather than size (a preview that is shown once and dropped). */
  fastPng?: boolean
}

export interface PrepareTimings {
  decodeMs: number
  greyMs: number
  resampleMs: number
  eveningMs: number
  thresholdMs: number
  pngMs: number
  totalMs: number
}

export interface PreparedBitmap {
  /** 1 = ink, 0 = paper, row-major, width × height. */
  bitmap: Uint8Array
  width: number
  height: number
  pxPerMm: number
  widthMm: number
  heightMm: number
  /** Threshold used (ink = grey <= threshold), automatic or manual. */
  threshold: number
  /** 256-bin histogram of the grey image the threshold was applied to. */
  histogram: Uint32Array
  /** The prepared bitmap as PNG: black ink on white paper, 2-colour palette. */
  png: Buffer
  /** Source size after orientation and crop, in source pixels. */
  source: { width: number, height: number, orientedWidth: number, orientedHeight: number }
  size: PreparedSize
  settings: PipelineSettings
  timings: PrepareTimings
}

function asU8(b: Buffer): Uint8Array {
  return new Uint8Array(b.buffer, b.byteOffset, b.length)
}

/** 1-bit ink/paper bitmap (1 = ink) as a black-on-white 2-colour PNG. */
export async function bitmapToPng(bitmap: Uint8Array, width: number, height: number, fast = false): Promise<Buffer> {
  const grey = new Uint8Array(bitmap.length)
  for (let i = 0; i < bitmap.length; i++) grey[i] = bitmap[i] ? 0 : 255
  const img = sharp(grey, { raw: { width, height, channels: 1 } }).toColourspace('b-w')
  // Stored bitmaps: a 2-colour palette, packed small. Previews: plain grey, quick to write.
  return (fast ? img.png({ compressionLevel: 1, adaptiveFiltering: false }) : img.png({ palette: true, colours: 2, dither: 0, compressionLevel: 9 })).toBuffer()
}

export async function prepareBitmap(
  input: Buffer | Uint8Array,
  settingsInput: PipelineSettingsInput | PipelineSettings,
  targetWidthMm: number,
  options: PrepareOptions = {},
): Promise<PreparedBitmap> {
  const settings = parseSettings(settingsInput)
  const t0 = performance.now()
  const maxSourcePixels = options.maxSourcePixels ?? 100_000_000

  let meta: Metadata
  try {
    meta = await sharp(input, { limitInputPixels: maxSourcePixels }).metadata()
  } catch (e) {
    throw new PrepareError('The file could not be read as an image (JPEG, PNG, WebP, TIFF, GIF or AVIF).', { cause: e })
  }
  const orientedWidth = meta.autoOrient?.width ?? meta.width
  const orientedHeight = meta.autoOrient?.height ?? meta.height
  if (!orientedWidth || !orientedHeight) throw new PrepareError('The image has no pixel size.')

  let img = sharp(input, { limitInputPixels: maxSourcePixels, failOn: 'error' }).autoOrient()
  let srcW = orientedWidth
  let srcH = orientedHeight
  const crop = settings.crop
  if (crop) {
    if (crop.x + crop.width > orientedWidth || crop.y + crop.height > orientedHeight) {
      throw new PrepareError(
        `The crop rectangle (${crop.x}, ${crop.y}, ${crop.width} × ${crop.height}) lies outside the upright source of ${orientedWidth} × ${orientedHeight} pixels.`,
      )
    }
    img = img.extract({ left: crop.x, top: crop.y, width: crop.width, height: crop.height })
    srcW = crop.width
    srcH = crop.height
  }
  let raw: { data: Buffer, info: OutputInfo }
  try {
    raw = await img.toColourspace('srgb').raw({ depth: 'uchar' }).toBuffer({ resolveWithObject: true })
  } catch (e) {
    throw new PrepareError('The image could not be decoded.', { cause: e })
  }
  const t1 = performance.now()
  if (raw.info.width !== srcW || raw.info.height !== srcH) {
    throw new PrepareError(`Decoded size ${raw.info.width} × ${raw.info.height} differs from the expected ${srcW} × ${srcH}.`)
  }
  const channels = raw.info.channels
  if (channels < 1 || channels > 4) throw new PrepareError(`Unexpected channel count ${channels}.`)
  let grey = toGrey(asU8(raw.data), srcW, srcH, channels as 1 | 2 | 3 | 4, settings.luma)
  const t2 = performance.now()

  const size = preparedSize({
    sourceWidthPx: srcW, sourceHeightPx: srcH, targetWidthMm,
    minPxPerMm: options.minPxPerMm, maxPxPerMm: options.maxPxPerMm,
    maxUpscale: options.maxUpscale, maxPixels: options.maxPixels,
  })
  const width = size.widthPx
  const height = size.heightPx
  if (width !== srcW || height !== srcH) {
    grey = await resizeGrey(grey, srcW, srcH, width, height)
  }
  const t3 = performance.now()

  if (settings.lightingEvening.enabled && settings.lightingEvening.strength > 0) {
    grey = await evenLighting(grey, width, height, { strength: settings.lightingEvening.strength })
  }
  const t4 = performance.now()

  const histogram = makeHistogram(grey)
  const threshold = settings.threshold.mode === 'auto' ? otsuThreshold(histogram) : settings.threshold.value
  const bitmap = new Uint8Array(width * height)
  const inkValue = settings.swapInkAndPaper ? 0 : 1
  for (let i = 0; i < bitmap.length; i++) bitmap[i] = grey[i]! <= threshold ? inkValue : 1 - inkValue
  const t5 = performance.now()

  const png = await bitmapToPng(bitmap, width, height, options.fastPng)
  const t6 = performance.now()

  return {
    bitmap, width, height,
    pxPerMm: size.pxPerMm,
    widthMm: targetWidthMm,
    heightMm: size.heightMm,
    threshold, histogram, png,
    source: { width: srcW, height: srcH, orientedWidth, orientedHeight },
    size, settings,
    timings: {
      decodeMs: t1 - t0, greyMs: t2 - t1, resampleMs: t3 - t2, eveningMs: t4 - t3,
      thresholdMs: t5 - t4, pngMs: t6 - t5, totalMs: t6 - t0,
    },
  }
}
