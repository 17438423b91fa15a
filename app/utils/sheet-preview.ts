// The cut sheet as the job and batch pages show it. The file's lines are hairlines in
// millimetres (what a laser's software wants), which a sheet shrunk to a page's width draws
// thinner than a pixel. For the screen every line gets a width in screen pixels that does not
// scale with the drawing (SVG 1.2 Tiny / SVG 2 vector-effect: non-scaling-stroke), and the
// kinds of line differ by pattern and weight, not only by colour: copy outlines solid and
// heavy, weeding lines dashed, weeding frames dotted; copy ids are text.

import type { WorkItemView } from '#shared/types/work'

/** How each kind of line looks on screen; the legend under the picture uses the same values. */
export const SCREEN_LINES = {
  outline: { widthPx: 2, dash: '', colour: '#1f4a3f', words: 'Copy outline (cut)' },
  weeding: { widthPx: 1.25, dash: '7 4', colour: '#8a4b12', words: 'Weeding line (cut)' },
  frame: { widthPx: 1.25, dash: '1.5 3', colour: '#1f4a3f', words: 'Weeding frame (cut)' },
} as const
export type ScreenLine = keyof typeof SCREEN_LINES

function rule(selector: string, l: (typeof SCREEN_LINES)[ScreenLine]): string {
  const dash = l.dash ? `stroke-dasharray:${l.dash};` : 'stroke-dasharray:none;'
  return `${selector}{vector-effect:non-scaling-stroke;stroke:${l.colour};stroke-width:${l.widthPx}px;${dash}stroke-linejoin:round;stroke-linecap:round}`
}

/** The style sheet that makes a cut sheet's file readable on screen (ids as written by server/cutsheet/svg.ts). */
export const SCREEN_SHEET_STYLE = [
  rule('path,use', SCREEN_LINES.outline),
  rule('g[id$="-weeding"] path', SCREEN_LINES.weeding),
  rule('g[id$="-frames"] path', SCREEN_LINES.frame),
  'g[id$="-labels"] text{fill:#3d3d3d;font-weight:600}',
].join('')

/** The cut sheet's SVG with the screen style added after its root tag; the lines themselves are untouched. */
export function screenSheetSvg(svg: string): string {
  const open = /<svg\b[^>]*>/.exec(svg)
  if (!open) throw new Error('This is not an SVG document.')
  const at = open.index + open[0].length
  return `${svg.slice(0, at)}\n<style>${SCREEN_SHEET_STYLE}</style>${svg.slice(at)}`
}

/** What the browser says while a cut sheet is built as a work item. */
export function sheetWorkWords(w: Pick<WorkItemView, 'state' | 'phase' | 'percent'>): { words: string; percent: number } {
  const words = w.state === 'queued' || w.phase === 'waiting' ? 'Waiting for a free worker…'
    : w.phase === 'reading' ? 'Reading the drawings…'
      : w.phase === 'outlining' ? 'Laying out the copies, writing and keeping the files…'
        : w.phase === 'storing' ? 'Keeping the files…'
          : 'Finishing…'
  return { words, percent: w.percent }
}
