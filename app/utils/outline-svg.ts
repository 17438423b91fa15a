// Reads our own clean vector (server/pipeline/clean.ts: one <svg> in mm with a viewBox in mm,
// path data with the even-odd fill rule) so the bench can draw it in its own colours, laid
// over the source or over another revision. Plain text parsing: no DOM, so it is unit-tested.

export interface ParsedOutline {
  widthMm: number
  heightMm: number
  viewBox: [number, number, number, number]
  /** Path data of every <path>, in viewBox units (mm). */
  paths: string[]
}

function attr(tag: string, name: string): string | null {
  const m = new RegExp(`\\s${name}\\s*=\\s*("([^"]*)"|'([^']*)')`).exec(tag)
  return m ? (m[2] ?? m[3] ?? '') : null
}

export function parseOutlineSvg(svg: string): ParsedOutline | null {
  const root = /<svg\b[^>]*>/i.exec(svg)?.[0]
  if (!root) return null
  const vb = (attr(root, 'viewBox') ?? '').trim().split(/[\s,]+/).map(Number)
  const width = Number.parseFloat(attr(root, 'width') ?? '')
  const height = Number.parseFloat(attr(root, 'height') ?? '')
  let viewBox: [number, number, number, number]
  if (vb.length === 4 && vb.every(Number.isFinite)) viewBox = [vb[0]!, vb[1]!, vb[2]!, vb[3]!]
  else if (Number.isFinite(width) && Number.isFinite(height)) viewBox = [0, 0, width, height]
  else return null
  const paths: string[] = []
  for (const m of svg.matchAll(/<path\b[^>]*>/gi)) {
    const d = attr(m[0], 'd')
    if (d && d.trim()) paths.push(d.trim())
  }
  return {
    widthMm: Number.isFinite(width) ? width : viewBox[2],
    heightMm: Number.isFinite(height) ? height : viewBox[3],
    viewBox,
    paths,
  }
}

export function viewBoxText(o: ParsedOutline): string {
  return o.viewBox.join(' ')
}

/** The outline as a standalone SVG in one fill colour, for drawing onto a canvas. */
export function tintedOutlineSvg(o: ParsedOutline, fill: string, pixelWidth: number, pixelHeight: number): string {
  const paths = o.paths.map((d) => `<path d="${d.replace(/"/g, '')}"/>`).join('')
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${pixelWidth}" height="${pixelHeight}" viewBox="${viewBoxText(o)}" preserveAspectRatio="none"><g fill="${fill}" fill-rule="evenodd">${paths}</g></svg>`
}
