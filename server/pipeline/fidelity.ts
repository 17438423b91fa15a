// Fidelity: how closely a vector, rasterised back at the prepared bitmap's resolution,
// matches the prepared bitmap — intersection over union of the two ink sets.
//
// Rasterising: the SVG's root width and height are replaced by the bitmap's size in pixels
// (unitless, i.e. px) and preserveAspectRatio="none" is set, so the viewBox — whatever its
// units — maps exactly onto the pixel grid: pixel (x, y) covers [x, x+1] × [y, y+1] of the
// bitmap's coordinates. librsvg (through sharp) antialiases by coverage; a pixel is ink when
// its alpha is at least 128, i.e. at least half of it is covered.
import sharp from 'sharp'

function setRootSize(svg: string, width: number, height: number): string {
  const m = /<svg\b[^>]*>/.exec(svg)
  if (!m) throw new Error('Not an SVG document.')
  let tag = m[0]
  tag = tag.replace(/\s(width|height|preserveAspectRatio)\s*=\s*("[^"]*"|'[^']*')/g, '')
  tag = tag.replace(/^<svg\b/, `<svg width="${width}" height="${height}" preserveAspectRatio="none"`)
  return svg.slice(0, m.index) + tag + svg.slice(m.index + m[0].length)
}

/** Rasterise an SVG to a width × height 1-bit bitmap (1 = ink: alpha ≥ 128). */
export async function rasteriseSvg(svg: string, width: number, height: number): Promise<Uint8Array> {
  const doc = setRootSize(svg, width, height)
  const { data, info } = await sharp(Buffer.from(doc), { density: 72, limitInputPixels: false })
    .ensureAlpha()
    .raw()
    .toBuffer({ resolveWithObject: true })
  if (info.width !== width || info.height !== height) {
    throw new Error(`Rasterised size ${info.width} × ${info.height} differs from ${width} × ${height}.`)
  }
  const ch = info.channels
  const out = new Uint8Array(width * height)
  for (let i = 0, j = ch - 1; i < out.length; i++, j += ch) out[i] = data[j]! >= 128 ? 1 : 0
  return out
}

export interface IoU { iou: number, intersection: number, union: number }

/** Intersection over union of two equally sized 1-bit bitmaps (1 = ink). Both empty → 1. */
export function intersectionOverUnion(a: Uint8Array, b: Uint8Array): IoU {
  if (a.length !== b.length) throw new RangeError('Bitmaps differ in size.')
  let inter = 0, uni = 0
  for (let i = 0; i < a.length; i++) {
    const x = a[i]!, y = b[i]!
    if (x & y) inter++
    if (x | y) uni++
  }
  return { iou: uni === 0 ? 1 : inter / uni, intersection: inter, union: uni }
}

export interface Fidelity extends IoU { raster: Uint8Array }

/** Fidelity of an SVG (clean vector or raw outline) against its prepared bitmap. */
export async function fidelity(svg: string, prepared: { bitmap: Uint8Array, width: number, height: number }): Promise<Fidelity> {
  const raster = await rasteriseSvg(svg, prepared.width, prepared.height)
  return { ...intersectionOverUnion(raster, prepared.bitmap), raster }
}
