import sharp, { type Metadata } from 'sharp'
import { createError } from 'h3'
import { ACCEPTED_MEDIA, MAX_SOURCE_PIXELS, MIN_SOURCE_SIDE_PX, UPLOAD_KINDS } from '#shared/constants/uploads'

export interface SourceFacts { mediaType: string; extension: string; widthPx: number; heightPx: number }

/** What the uploaded bytes are, decided by their content (never by a name); 415 for anything we do not take, 422 for what we cannot use. */
export async function inspectSource(bytes: Uint8Array): Promise<SourceFacts> {
  let meta: Metadata
  try {
    meta = await sharp(bytes, { limitInputPixels: false }).metadata()
  } catch {
    throw createError({ statusCode: 415, message: `This file is not a picture we can read. Upload a photo or scan as ${UPLOAD_KINDS}.` })
  }
  // HEIF is a container: AVIF (AV1) we take; HEIC (HEVC) sharp's prebuilt libvips cannot decode.
  const format = meta.format === 'heif' ? (meta.compression === 'av1' ? 'avif' : 'heic') : meta.format
  if (format === 'heic') {
    throw createError({ statusCode: 415, message: `HEIC photos cannot be read here. Set the phone to save "most compatible" (JPEG), or export the photo as ${UPLOAD_KINDS}.` })
  }
  const kind = ACCEPTED_MEDIA.find((m) => m.format === format)
  if (!kind) {
    throw createError({ statusCode: 415, message: `A ${String(meta.format).toUpperCase()} file is not accepted. Upload a photo or scan as ${UPLOAD_KINDS}.` })
  }
  const width = meta.width ?? 0
  // For an animation, the first frame's height (sharp reports all pages stacked otherwise).
  const height = meta.pageHeight ?? meta.height ?? 0
  if (!width || !height) throw createError({ statusCode: 422, message: 'This picture has no size; it may be damaged. Try saving it again.' })
  if (Math.min(width, height) < MIN_SOURCE_SIDE_PX) {
    throw createError({ statusCode: 422, message: `This picture is only ${width} × ${height} pixels; a drawing needs at least ${MIN_SOURCE_SIDE_PX} pixels on each side. Upload the scan or photo itself, not an icon or thumbnail of it.` })
  }
  if (width * height > MAX_SOURCE_PIXELS) {
    const mp = Math.round((width * height) / 1e6)
    throw createError({ statusCode: 422, message: `This picture is ${mp} megapixels; the limit is ${MAX_SOURCE_PIXELS / 1e6}. Scan at a lower resolution (300 dpi is plenty) or shrink the photo.` })
  }
  const swapped = (meta.orientation ?? 1) >= 5
  return { mediaType: kind.mediaType, extension: kind.extension, widthPx: swapped ? height : width, heightPx: swapped ? width : height }
}
