// The cut sheet as SVG: one document per sheet of film, for the operator to load into the
// laser's software, plus a joined document of all sheets side by side for the job page.
//
// Decisions:
//  - One file per sheet. Each sheet is one cutting session on one piece of film, so the
//    operator loads exactly what goes on the bed. cutSheetPreviewSvg joins them for viewing.
//  - The page is the film: the root's width and height are the sheet's size in mm and the
//    viewBox is the same numbers, so one user unit is one millimetre (SVG 1.1 §7 coordinate
//    systems; "mm" per CSS Values and Units §5.2, 1in = 25.4mm = 96px). The film's edge is
//    therefore the page edge in any viewer and needs no line of its own.
//  - Everything drawn in a sheet file is to be cut: the copies' outlines and, optionally,
//    a weeding frame per copy, all with fill none and one stroke colour (CUT_STROKE).
//    The dashed sheet outline is drawn only in the preview, never in a cut file, so that no
//    laser software can take it for a cut.
//  - Each copy is a group <g id="dw-copy-N" transform="…"> holding one <path> per closed
//    curve in the copy's own coordinates; its weeding frame follows it in <g id="dw-frame-N">
//    in sheet coordinates (inner cuts before the frame that frees them: common practice, the
//    film cannot shift once a piece is cut loose). N counts copies over the whole job.
//  - Deterministic: the same input gives the same bytes; every number on the 0.01 mm grid.
import { formatMm, type CutCurve, readSvgRoot } from './path'
import { placeCopies, type Affine, type CutSheetInput, type Rect } from './place'

/** The one stroke colour of every cut line (our choice; it means "cut" only by being there). */
export const CUT_STROKE = '#2f5d50'
/**
 * Default stroke width, mm: a hairline. Thin strokes such as 0.1 mm are a common practice in
 * laser cutting files (common practice, not a standard): the stroke marks the path, the laser
 * cuts along its centre line.
 */
export const HAIRLINE_MM = 0.1
/** Preview only: the film's edge, dashed, in a colour distinct from the cut colour. */
export const SHEET_OUTLINE_STROKE = '#8a8f98'
/** Preview only: space between sheets side by side, mm. */
export const PREVIEW_SPACING_MM = 10

export interface CutSheetSvgInput extends CutSheetInput {
  /** Stroke width in mm (default HAIRLINE_MM). */
  strokeMm?: number
}

const f = formatMm

/** Path data of one closed curve, absolute, on the 0.01 mm grid. */
export function curvePathData(curve: CutCurve): string {
  const s0 = curve.segments[0]!.from
  let d = `M${f(s0.x)} ${f(s0.y)}`
  const n = curve.segments.length
  curve.segments.forEach((s, i) => {
    // A final straight line back to the start is what Z draws anyway.
    if (i === n - 1 && i > 0 && s.kind === 'line' && f(s.to.x) === f(s0.x) && f(s.to.y) === f(s0.y)) return
    d += s.kind === 'line'
      ? `L${f(s.to.x)} ${f(s.to.y)}`
      : `C${f(s.c1.x)} ${f(s.c1.y)} ${f(s.c2.x)} ${f(s.c2.y)} ${f(s.to.x)} ${f(s.to.y)}`
  })
  return d + 'Z'
}

export function transformAttribute(t: Affine): string {
  if (t.a === 1 && t.b === 0 && t.c === 0 && t.d === 1) return `translate(${f(t.e)} ${f(t.f)})`
  return `matrix(${f(t.a)} ${f(t.b)} ${f(t.c)} ${f(t.d)} ${f(t.e)} ${f(t.f)})`
}

export function rectPathData(r: Rect): string {
  return `M${f(r.x)} ${f(r.y)}H${f(r.x + r.width)}V${f(r.y + r.height)}H${f(r.x)}Z`
}

function rootTag(widthMm: number, heightMm: number): string {
  const w = f(widthMm), h = f(heightMm)
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${w}mm" height="${h}mm" viewBox="0 0 ${w} ${h}">`
}

/** One SVG document per sheet, in sheet order. */
export function cutSheetSvg(input: CutSheetSvgInput): string[] {
  const stroke = input.strokeMm ?? HAIRLINE_MM
  if (typeof stroke !== 'number' || !Number.isFinite(stroke) || stroke <= 0) throw new RangeError('The stroke width must be a positive number of millimetres.')
  const sheets = placeCopies(input)
  const paths = input.curves.map((c) => `<path d="${curvePathData(c)}"/>`)
  const { layout } = input
  return sheets.map((sheet) => {
    const notes = [
      `${sheet.copies.length} ${sheet.copies.length === 1 ? 'copy' : 'copies'} of ${f(input.copyWidthMm)} × ${f(input.copyHeightMm)} mm`,
      layout.turned ? 'turned 90° clockwise' : null,
      input.mirror ? 'mirrored' : null,
      input.weedingFrameMm === null ? null : `weeding frame ${f(input.weedingFrameMm)} mm from each copy`,
    ].filter(Boolean).join(', ')
    const lines = [
      rootTag(input.sheetWidthMm, input.sheetHeightMm),
      `<!-- Decalwright cut sheet ${sheet.number} of ${sheets.length}: ${notes}. The page is the ${f(input.sheetWidthMm)} × ${f(input.sheetHeightMm)} mm film sheet; every line drawn is a cut. -->`,
      `<g id="dw-sheet-${sheet.number}" fill="none" stroke="${CUT_STROKE}" stroke-width="${f(stroke)}">`,
    ]
    for (const copy of sheet.copies) {
      lines.push(`<g id="dw-copy-${copy.number}" transform="${transformAttribute(copy.transform)}">`, ...paths, '</g>')
      if (copy.frame) lines.push(`<g id="dw-frame-${copy.number}"><path d="${rectPathData(copy.frame)}"/></g>`)
    }
    lines.push('</g>', '</svg>')
    return lines.join('\n') + '\n'
  })
}

/**
 * All sheets side by side, left to right, `spacingMm` apart, each with its film edge drawn
 * dashed in <g id="dw-sheet-outline-N"> (preview only: not a cut file, and marked so).
 * Takes the documents cutSheetSvg returned.
 */
export function cutSheetPreviewSvg(sheetSvgs: string[], options: { spacingMm?: number } = {}): string {
  const spacing = options.spacingMm ?? PREVIEW_SPACING_MM
  if (!(spacing >= 0) || !Number.isFinite(spacing)) throw new RangeError('The spacing between sheets must be zero or a positive number of millimetres.')
  if (sheetSvgs.length === 0) throw new RangeError('There are no sheets to preview.')
  let x = 0
  let height = 0
  const body: string[] = []
  sheetSvgs.forEach((svg, i) => {
    const root = readSvgRoot(svg)
    const open = /<svg\b[^>]*>/.exec(svg)!
    const inner = svg.slice(open.index + open[0].length, svg.lastIndexOf('</svg>')).trim()
    body.push(
      `<g id="dw-preview-${i + 1}" transform="translate(${f(x)} 0)">`,
      `<!-- film edge of sheet ${i + 1}: preview only, not a cut -->`,
      `<g id="dw-sheet-outline-${i + 1}" fill="none" stroke="${SHEET_OUTLINE_STROKE}" stroke-width="0.3" stroke-dasharray="3 2"><path d="${rectPathData({ x: 0, y: 0, width: root.widthMm, height: root.heightMm })}"/></g>`,
      inner,
      '</g>',
    )
    x += root.widthMm + spacing
    height = Math.max(height, root.heightMm)
  })
  const width = x - spacing
  return [
    rootTag(width, height),
    `<!-- Decalwright cut sheet preview: ${sheetSvgs.length === 1 ? "1 sheet" : `${sheetSvgs.length} sheets side by side`}. For viewing only; cut from the one-sheet files. -->`,
    ...body,
    '</svg>',
  ].join('\n') + '\n'
}
