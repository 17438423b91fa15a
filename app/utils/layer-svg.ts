// A layered revision's stacked clean vector (one group per layer, bottom first, each filled
// in its ink's colour) taken apart for drawing: its viewBox and size, and each layer's group,
// so a page can draw every layer stacked or one alone from the one file.

export interface StackedDrawing {
  viewBox: string
  widthMm: number
  heightMm: number
  /** Each layer's group as it stands in the file (`<g id="dw-layer-N" fill="#rrggbb" …>…</g>`), bottom first. */
  groups: string[]
}

/** Reads the stacked vector; null when it is not one (no groups, no size in mm). */
export function readStackedSvg(svg: string): StackedDrawing | null {
  const root = /<svg\b[^>]*>/.exec(svg)?.[0]
  if (!root) return null
  const w = /\swidth="([\d.]+)mm"/.exec(root), h = /\sheight="([\d.]+)mm"/.exec(root), vb = /\sviewBox="([^"]+)"/.exec(root)
  if (!w || !h || !vb) return null
  // Our groups hold paths only: no nested groups, so the first closing tag ends each.
  const groups = [...svg.matchAll(/<g id="dw-layer-\d+"[^>]*>[\s\S]*?<\/g>/g)].map((m) => m[0])
  if (groups.length === 0) return null
  return { viewBox: vb[1]!, widthMm: Number(w[1]), heightMm: Number(h[1]), groups }
}

/** The groups to draw: every layer (null) or the one at `position` alone. */
export function layersToDraw(d: StackedDrawing, position: number | null): string {
  return position === null ? d.groups.join('') : (d.groups[position] ?? '')
}

/** Where a layer sits in the stack, in words: bottom, top, or the n-th from the bottom. */
export function stackPlace(position: number, count: number): string {
  if (position === 0) return 'bottom'
  if (position === count - 1) return 'top'
  return count === 3 ? 'middle' : `${ordinal(position + 1)} from the bottom`
}

function ordinal(n: number): string {
  return ['first', 'second', 'third', 'fourth', 'fifth', 'sixth'][n - 1] ?? `${n}th`
}

/** Ink names as a list in words: "red", "red and blue", "yellow, red and blue". */
export function listInWords(names: string[]): string {
  return names.length <= 1 ? names.join('') : `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`
}
