import sharp, { type Metadata } from 'sharp'

export const UPLOAD_LIMIT_BYTES = 25 * 1024 * 1024
export const MAX_SOURCE_PIXELS = 60_000_000

export interface SourceFacts { mediaType: string; extension: string; widthPx: number; heightPx: number }

// Decided by the file's content (sharp reads the signature), never by its name.
const ACCEPTED: Record<string, { mediaType: string; extension: string }> = {
  jpeg: { mediaType: 'image/jpeg', extension: 'jpg' },
  png: { mediaType: 'image/png', extension: 'png' },
  webp: { mediaType: 'image/webp', extension: 'webp' },
  tiff: { mediaType: 'image/tiff', extension: 'tif' },
  gif: { mediaType: 'image/gif', extension: 'gif' },
}

const KINDS = 'JPEG, PNG, WebP, TIFF, GIF or AVIF'

/** What the uploaded bytes are; 415 for anything we do not take, 422 for what we cannot use. */
export async function inspectSource(bytes: Uint8Array): Promise<SourceFacts> {
  let meta: Metadata
  try {
    meta = await sharp(bytes, { limitInputPixels: false }).metadata()
  } catch {
    throw createError({ statusCode: 415, message: `This file is not a picture we can read. Upload a photo or scan as ${KINDS}.` })
  }
  let kind = ACCEPTED[meta.format ?? '']
  if (meta.format === 'heif') {
    // HEIF is a container: AVIF (AV1) we take; HEIC (HEVC) sharp's prebuilt libvips cannot decode.
    if (meta.compression === 'av1') kind = { mediaType: 'image/avif', extension: 'avif' }
    else throw createError({ statusCode: 415, message: `HEIC photos cannot be read here. Set the phone to save "most compatible" (JPEG), or export the photo as ${KINDS}.` })
  }
  if (!kind) {
    throw createError({ statusCode: 415, message: `A ${String(meta.format).toUpperCase()} file is not accepted. Upload a photo or scan as ${KINDS}.` })
  }
  const width = meta.width ?? 0
  // For an animation, the first frame's height (sharp reports all pages stacked otherwise).
  const height = meta.pageHeight ?? meta.height ?? 0
  if (!width || !height) throw createError({ statusCode: 422, message: 'This picture has no size; it may be damaged. Try saving it again.' })
  if (width * height > MAX_SOURCE_PIXELS) {
    const mp = Math.round((width * height) / 1e6)
    throw createError({ statusCode: 422, message: `This picture is ${mp} megapixels; the limit is ${MAX_SOURCE_PIXELS / 1e6}. Scan at a lower resolution (300 dpi is plenty) or shrink the photo.` })
  }
  const swapped = (meta.orientation ?? 1) >= 5
  return { ...kind, widthPx: swapped ? height : width, heightPx: swapped ? width : height }
}
