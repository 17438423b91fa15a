// Fidelity: how closely a vector, rasterised back at the prepared bitmap's resolution,
// matches the prepared bitmap — intersection over union of the two ink sets.
//
// Two rasterisers, one rule — a pixel is ink when at least half of it is covered:
//  - rasteriseCurves, ours, for the pipeline's own curves: the curves flattened to within
//    FLATTEN_TOLERANCE_PX, then each row of pixels filled between the crossings at the row's
//    centre line, even-odd. A pixel is ink when its centre is inside, which for an edge that
//    runs straight across the pixel is exactly "at least half covered". Linear in the pixels
//    and the crossings, with no SVG to write or parse.
//  - rasteriseSvg, librsvg through sharp, for any SVG: its root width and height are replaced by
//    the bitmap's size in pixels (unitless, i.e. px) and preserveAspectRatio="none" is set, so
//    the viewBox — whatever its units — maps exactly onto the pixel grid: pixel (x, y) covers
//    [x, x+1] × [y, y+1] of the bitmap's coordinates. librsvg antialiases by coverage; a pixel
//    is ink when its alpha is at least 128. fidelity.test.ts holds the two against each other.
import sharp from 'sharp'
import type { ClosedCurve } from './trace'

function setRootSize(svg: string, width: number, height: number): string {
  const m = /<svg\b[^>]*>/.exec(svg)
  if (!m) throw new Error('Not an SVG document.')
  let tag = m[0]
  tag = tag.replace(/\s(width|height|preserveAspectRatio)\s*=\s*("[^"]*"|'[^']*')/g, '')
  tag = tag.replace(/^<svg\b/, `<svg width="${width}" height="${height}" preserveAspectRatio="none"`)
  return svg.slice(0, m.index) + tag + svg.slice(m.index + m[0].length)
}

/** Coverage of each pixel by an SVG rendered by librsvg onto width × height pixels, 0–255. */
export async function svgCoverage(svg: string, width: number, height: number): Promise<Uint8Array> {
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
  for (let i = 0, j = ch - 1; i < out.length; i++, j += ch) out[i] = data[j]!
  return out
}

/** Rasterise an SVG to a width × height 1-bit bitmap (1 = ink: alpha ≥ 128). */
export async function rasteriseSvg(svg: string, width: number, height: number): Promise<Uint8Array> {
  const alpha = await svgCoverage(svg, width, height)
  for (let i = 0; i < alpha.length; i++) alpha[i] = alpha[i]! >= 128 ? 1 : 0
  return alpha
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

/** Largest distance between a cubic and the straight pieces it is drawn with, px. */
export const FLATTEN_TOLERANCE_PX = 0.02

/**
 * Closed curves filled even-odd onto a width × height bitmap (1 = ink): a pixel is ink when its
 * centre lies inside. Curve point (x, y) lands at (x · scaleX, y · scaleY) pixels.
 */
export function rasteriseCurves(curves: ClosedCurve[], width: number, height: number, scaleX = 1, scaleY = scaleX): Uint8Array {
  // Flattened edges, as consecutive (x0, y0, x1, y1).
  const edges: number[] = []
  for (const curve of curves) {
    for (const s of curve.segments) {
      const x0 = s.from.x * scaleX, y0 = s.from.y * scaleY, x3 = s.to.x * scaleX, y3 = s.to.y * scaleY
      if (s.kind === 'line') { edges.push(x0, y0, x3, y3); continue }
      const x1 = s.c1.x * scaleX, y1 = s.c1.y * scaleY, x2 = s.c2.x * scaleX, y2 = s.c2.y * scaleY
      // n equal steps stay within ¾ · max |second difference of the control points| / n² of it
      const dd = Math.max(Math.hypot(x0 - 2 * x1 + x2, y0 - 2 * y1 + y2), Math.hypot(x1 - 2 * x2 + x3, y1 - 2 * y2 + y3))
      const n = Math.max(1, Math.ceil(Math.sqrt((0.75 * dd) / FLATTEN_TOLERANCE_PX)))
      let px = x0, py = y0
      for (let i = 1; i <= n; i++) {
        const t = i / n, u = 1 - t
        const a = u * u * u, b = 3 * u * u * t, c = 3 * u * t * t, d = t * t * t
        const qx = i === n ? x3 : a * x0 + b * x1 + c * x2 + d * x3
        const qy = i === n ? y3 : a * y0 + b * y1 + c * y2 + d * y3
        edges.push(px, py, qx, qy)
        px = qx
        py = qy
      }
    }
  }
  // Crossings of each row's centre line y + 0.5, bucketed by row: an edge crosses the rows whose
  // centre lies in [top, bottom), so a vertex shared by two edges is counted once.
  const rowOf = (y: number) => Math.ceil(y - 0.5) // first row whose centre is at or below y
  const perRow = new Int32Array(height + 1)
  for (let e = 0; e < edges.length; e += 4) {
    const ya = edges[e + 1]!, yb = edges[e + 3]!
    if (ya === yb) continue
    const r0 = Math.max(0, rowOf(Math.min(ya, yb))), r1 = Math.min(height, rowOf(Math.max(ya, yb)))
    for (let r = r0; r < r1; r++) perRow[r + 1]!++
  }
  for (let r = 0; r < height; r++) perRow[r + 1]! += perRow[r]!
  const fill = perRow.slice(0, height)
  const xs = new Float64Array(perRow[height]!)
  for (let e = 0; e < edges.length; e += 4) {
    const xa = edges[e]!, ya = edges[e + 1]!, xb = edges[e + 2]!, yb = edges[e + 3]!
    if (ya === yb) continue
    const r0 = Math.max(0, rowOf(Math.min(ya, yb))), r1 = Math.min(height, rowOf(Math.max(ya, yb)))
    const slope = (xb - xa) / (yb - ya)
    for (let r = r0; r < r1; r++) xs[fill[r]!++] = xa + (r + 0.5 - ya) * slope
  }
  const out = new Uint8Array(width * height)
  for (let r = 0; r < height; r++) {
    const from = perRow[r]!, to = perRow[r + 1]!
    // a row has few crossings: insertion sort
    for (let i = from + 1; i < to; i++) {
      const v = xs[i]!
      let j = i - 1
      while (j >= from && xs[j]! > v) { xs[j + 1] = xs[j]!; j-- }
      xs[j + 1] = v
    }
    // even-odd: ink between the 1st and 2nd crossing, the 3rd and 4th…; pixel x is inside when
    // its centre x + 0.5 is
    for (let i = from; i + 1 < to; i += 2) {
      const a = Math.max(0, Math.ceil(xs[i]! - 0.5)), b = Math.min(width, Math.ceil(xs[i + 1]! - 0.5))
      if (b > a) out.fill(1, r * width + a, r * width + b)
    }
  }
  return out
}

/**
 * Fidelity of the clean vector against its prepared bitmap, rasterised by rasteriseCurves: its
 * curves in mm, its viewBox (0 0 widthMm heightMm) stretched over the bitmap as fidelity() does.
 */
export function outlineFidelity(
  clean: { curvesMm: ClosedCurve[], widthMm: number, heightMm: number },
  prepared: { bitmap: Uint8Array, width: number, height: number },
): Fidelity {
  const raster = rasteriseCurves(clean.curvesMm, prepared.width, prepared.height, prepared.width / clean.widthMm, prepared.height / clean.heightMm)
  return { ...intersectionOverUnion(raster, prepared.bitmap), raster }
}
