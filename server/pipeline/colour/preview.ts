// The stacked preview: every layer of a decal drawn in its colour, bottom first, in one SVG in
// millimetres (for the artwork page, the tuning bench and the compare view; also the one-file
// download, a group per layer); and one layer alone in its colour.
//
// Each layer's path data is taken as it stands in the layer's clean vector, so the preview
// shows exactly what is cut. Deterministic: the same layers give the same bytes.
import { readSvgRoot } from '../../cutsheet/path'
import { formatMm } from '../clean'

export interface PreviewLayer {
  /** The layer's clean vector (mm), as stackLayers / layerVector give it. */
  svg: string
  /** Its film's (or ink's) colour, #rrggbb. */
  hex: string
}

const HEX = /^#[0-9a-fA-F]{6}$/

function pathData(svg: string): string[] {
  return [...svg.matchAll(/<path\b[^>]*\sd="([^"]*)"/g)].map((m) => m[1]!)
}

function layerGroup(layer: PreviewLayer, index: number): string {
  if (!HEX.test(layer.hex)) throw new RangeError(`A layer's colour must be #rrggbb (got ${JSON.stringify(layer.hex)}).`)
  const paths = pathData(layer.svg).map((d) => `<path d="${d}"/>`).join('')
  return `<g id="dw-layer-${index + 1}" fill="${layer.hex.toLowerCase()}" fill-rule="evenodd">${paths}</g>`
}

function canvasOf(layers: PreviewLayer[]): { w: string, h: string } {
  if (layers.length === 0) throw new RangeError('There is no layer to draw.')
  const sizes = layers.map((l) => readSvgRoot(l.svg))
  const w = formatMm(sizes[0]!.widthMm), h = formatMm(sizes[0]!.heightMm)
  if (sizes.some((s) => formatMm(s.widthMm) !== w || formatMm(s.heightMm) !== h)) {
    throw new RangeError('The layers of one decal must share one canvas (the same width and height in mm).')
  }
  return { w, h }
}

function document(w: string, h: string, body: string, background: string | null): string {
  if (background !== null && !HEX.test(background)) throw new RangeError(`The background must be #rrggbb (got ${JSON.stringify(background)}).`)
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${w}mm" height="${h}mm" viewBox="0 0 ${w} ${h}">`
    + (background ? `<rect width="${w}" height="${h}" fill="${background.toLowerCase()}"/>` : '')
    + body + '</svg>\n'
}

/** Every layer in its colour, bottom first, a group `dw-layer-N` each; optionally on a background colour. */
export function stackedPreviewSvg(layers: PreviewLayer[], background: string | null = null): string {
  const { w, h } = canvasOf(layers)
  return document(w, h, layers.map(layerGroup).join(''), background)
}

/** One layer alone, in its colour (numbered as in the stack). */
export function layerPreviewSvg(layers: PreviewLayer[], index: number, background: string | null = null): string {
  const { w, h } = canvasOf(layers)
  const layer = layers[index]
  if (!layer) throw new RangeError(`There is no layer ${index + 1}.`)
  return document(w, h, layerGroup(layer, index), background)
}
