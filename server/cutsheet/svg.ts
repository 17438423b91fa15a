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
//  - Each design's cut path is defined once, in <defs> as <path id="dw-design-ID">, and every
//    copy is a <use id="dw-copy-LABEL"> of it with its placement as a transform (SVG 1.1 §5.6,
//    the 'use' element; referenced with xlink:href, which SVG 1.1 readers need and SVG 2
//    readers still accept). A 200-copy sheet stays the size of one copy plus 200 short lines.
//  - Everything drawn with a stroke is to be cut, all in one stroke colour (CUT_STROKE) with
//    fill none, in <g id="dw-sheet-N">: weeding lines first (dw-sheet-N-weeding), then the
//    copies (dw-sheet-N-copies; inside each, smaller outlines first), then the weeding frames
//    that free them (dw-sheet-N-frames): inner cuts before the cut that frees them (common
//    practice: the film cannot shift once a piece is cut loose).
//  - Label text, when asked for, is a separate group before the cuts, dw-sheet-N-labels: text
//    filled in the same colour and never stroked, to be marked (or switched off), not cut.
//    Each <text> is fitted to a stated baseline length (textLength), so it takes the room
//    the layout gave it whatever font the viewer picks.
//  - The dashed sheet outline is drawn only in the preview, never in a cut file, so that no
//    laser software can take it for a cut.
//  - Deterministic: the same input gives the same bytes; every number on the 0.01 mm grid.
import { curvePathData } from './design'
import { CAP_HEIGHT_EM } from './pack'
import { formatMm, readSvgRoot } from './path'
import { jobSheetPlans, type Affine, type CutSheetInput, type Rect } from './place'
import type { SheetPlan } from './plan'

export { curvePathData }

/** The one colour of every cut line and label (our choice; it means "cut" only by being there). */
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

export function transformAttribute(t: Affine): string {
  if (t.a === 1 && t.b === 0 && t.c === 0 && t.d === 1) return `translate(${f(t.e)} ${f(t.f)})`
  return `matrix(${f(t.a)} ${f(t.b)} ${f(t.c)} ${f(t.d)} ${f(t.e)} ${f(t.f)})`
}

export function rectPathData(r: Rect): string {
  return `M${f(r.x)} ${f(r.y)}H${f(r.x + r.width)}V${f(r.y + r.height)}H${f(r.x)}Z`
}

function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;')
}

function rootTag(widthMm: number, heightMm: number): string {
  const w = f(widthMm), h = f(heightMm)
  return `<svg xmlns="http://www.w3.org/2000/svg" xmlns:xlink="http://www.w3.org/1999/xlink" width="${w}mm" height="${h}mm" viewBox="0 0 ${w} ${h}">`
}

/** One sheet's SVG document from its plan. */
export function writeSheetSvg(plan: SheetPlan): string {
  const n = plan.number
  const marks = plan.texts.length ? ` The text in dw-sheet-${n}-labels is to be marked, not cut; switch that group off to leave it out.` : ''
  const lines = [
    rootTag(plan.widthMm, plan.heightMm),
    `<!-- Decalwright ${escapeXml(plan.notes)}. The page is the ${f(plan.widthMm)} × ${f(plan.heightMm)} mm film sheet; every stroked line is a cut.${marks} -->`,
    '<defs>',
    ...plan.designs.map((d) => `<path id="dw-design-${d.id}" d="${d.pathData}"/>`),
    '</defs>',
  ]
  if (plan.texts.length) {
    lines.push(`<g id="dw-sheet-${n}-labels" fill="${CUT_STROKE}" stroke="none" font-family="monospace">`)
    for (const t of plan.texts) {
      const size = f(t.capHeightMm / CAP_HEIGHT_EM)
      const turn = t.turned ? ` transform="rotate(90 ${f(t.x)} ${f(t.y)})"` : ''
      // textLength only where the text has a known width (labels); legends keep their own.
      const fit = t.widthMm > 0 ? ` textLength="${f(t.widthMm)}" lengthAdjust="spacingAndGlyphs"` : ''
      lines.push(`<text id="dw-label-${t.id}" x="${f(t.x)}" y="${f(t.y)}" font-size="${size}"${fit}${turn}>${escapeXml(t.text)}</text>`)
    }
    lines.push('</g>')
  }
  lines.push(`<g id="dw-sheet-${n}" fill="none" stroke="${CUT_STROKE}" stroke-width="${f(plan.strokeMm)}">`)
  if (plan.weedingLines.length) {
    lines.push(`<g id="dw-sheet-${n}-weeding">`)
    for (const l of plan.weedingLines) lines.push(`<path d="M${l.map((p) => `${f(p.x)} ${f(p.y)}`).join('L')}"/>`)
    lines.push('</g>')
  }
  lines.push(`<g id="dw-sheet-${n}-copies">`)
  for (const c of plan.copies) lines.push(`<use id="dw-copy-${c.id}" xlink:href="#dw-design-${c.designId}" transform="${transformAttribute(c.transform)}"/>`)
  lines.push('</g>')
  if (plan.frames.length) {
    lines.push(`<g id="dw-sheet-${n}-frames">`)
    for (const fr of plan.frames) lines.push(`<path id="dw-frame-${fr.id}" d="${rectPathData(fr.rect)}"/>`)
    lines.push('</g>')
  }
  lines.push('</g>', '</svg>')
  return lines.join('\n') + '\n'
}

/** A one-job cut sheet (one design laid out by layoutSheets): one SVG document per sheet, in sheet order. */
export function cutSheetSvg(input: CutSheetSvgInput): string[] {
  const stroke = input.strokeMm ?? HAIRLINE_MM
  if (typeof stroke !== 'number' || !Number.isFinite(stroke) || stroke <= 0) throw new RangeError('The stroke width must be a positive number of millimetres.')
  return jobSheetPlans(input, { strokeMm: stroke }).map(writeSheetSvg)
}

/**
 * All sheets side by side, left to right, `spacingMm` apart, each with its film edge drawn
 * dashed in <g id="dw-sheet-outline-N"> (preview only: not a cut file, and marked so).
 * Takes the documents cutSheetSvg or buildCutSheets wrote; each design is defined once.
 */
export function cutSheetPreviewSvg(sheetSvgs: string[], options: { spacingMm?: number } = {}): string {
  const spacing = options.spacingMm ?? PREVIEW_SPACING_MM
  if (!(spacing >= 0) || !Number.isFinite(spacing)) throw new RangeError('The spacing between sheets must be zero or a positive number of millimetres.')
  if (sheetSvgs.length === 0) throw new RangeError('There are no sheets to preview.')
  let x = 0
  let height = 0
  const defs = new Map<string, string>()
  const body: string[] = []
  sheetSvgs.forEach((svg, i) => {
    const root = readSvgRoot(svg)
    const open = /<svg\b[^>]*>/.exec(svg)!
    let inner = svg.slice(open.index + open[0].length, svg.lastIndexOf('</svg>'))
    inner = inner.replace(/<defs>([\s\S]*?)<\/defs>/g, (_, content: string) => {
      for (const m of content.matchAll(/<path id="([^"]+)"[^>]*\/>/g)) if (!defs.has(m[1]!)) defs.set(m[1]!, m[0])
      return ''
    }).replace(/<!--[\s\S]*?-->/g, '').trim()
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
    `<!-- Decalwright cut sheet preview: ${sheetSvgs.length === 1 ? '1 sheet' : `${sheetSvgs.length} sheets side by side`}. For viewing only; cut from the one-sheet files. -->`,
    '<defs>', ...defs.values(), '</defs>',
    ...body,
    '</svg>',
  ].join('\n') + '\n'
}
