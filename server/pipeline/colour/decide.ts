// Whether an upload becomes a layered revision, and of which inks. The separation finds every
// colour that is not paper; not every such colour is a film to cut. Left out, so a one-ink
// drawing stays with the single-colour pipeline exactly as before:
//  - the paper's own lines: an ink whose pixels are mostly ruled or grid lines (the
//    single-colour pipeline's line finder, lines.ts, run on the ink's mask), or one long thin
//    line across the sheet (a margin line);
//  - greys: black, grey and pencil shading are one ink (graphite pressed harder is not a second
//    film), so every ink of low chroma joins the others of low chroma;
//  - small inks: less than MIN_LAYER_SHARE of the drawing's ink (specks, a stray blend).
// A photo taken at an angle is judged on the sheet the clean-up straightened (straighten.ts).
// Pure: plain data in, plain data out.
import { findPaperLines, removeLines } from '../lines'
import { lch, type Lab } from './lab'

/** An ink holding less than this share of all ink pixels is not a layer (our setting). */
export const MIN_LAYER_SHARE = 0.02
/** Inks below this CIELAB chroma are greys: they join into one ink (our setting). */
export const NEUTRAL_CHROMA = 12
/** An ink with at least this share of its pixels on paper lines is the paper's, not a layer. */
const LINE_SHARE = 0.5
/** A single line: its pixels' box this thin next to its length … */
const LINE_ASPECT = 0.03
/** … and at least this share of the picture's side long. */
const LINE_REACH = 0.6

export interface InkToJudge {
  name: string
  lab: Lab
  /** Share of the picture's pixels. */
  share: number
  /** 1 = ink; width × height. */
  mask: Uint8Array
}

export type LeftOut = 'paper lines' | 'too small'

export interface LayerDecision {
  layered: boolean
  /** Groups of indices into the inks judged, one group per layer, in their order. */
  groups: number[][]
  /** Why each ink left out is left out (index → reason). */
  leftOut: Array<{ index: number, reason: LeftOut }>
  /** One sentence for the record. */
  why: string
}

/** The box round a mask's ink (inclusive pixel bounds), or null without ink. */
export function inkBox(mask: Uint8Array, width: number, height: number): { x0: number, y0: number, x1: number, y1: number } | null {
  let x0 = width, y0 = height, x1 = -1, y1 = -1
  for (let y = 0; y < height; y++) {
    const row = y * width
    for (let x = 0; x < width; x++) {
      if (!mask[row + x]) continue
      if (x < x0) x0 = x
      if (x > x1) x1 = x
      if (y < y0) y0 = y
      y1 = y
    }
  }
  return x1 < 0 ? null : { x0, y0, x1, y1 }
}

/** Share of an ink's pixels that are the paper's lines: evenly spaced lines, or one long thin line. */
export function paperLineShare(mask: Uint8Array, width: number, height: number): number {
  let total = 0
  for (let i = 0; i < mask.length; i++) total += mask[i]!
  if (total === 0) return 0
  const b = inkBox(mask, width, height)!
  const w = b.x1 - b.x0 + 1, h = b.y1 - b.y0 + 1
  if (Math.min(w, h) / Math.max(w, h) <= LINE_ASPECT && Math.max(w / width, h / height) >= LINE_REACH) return 1
  const darkness = new Uint8Array(mask.length)
  for (let i = 0; i < mask.length; i++) darkness[i] = mask[i] ? 255 : 0
  const families = findPaperLines(darkness, width, height)
  if (families.length === 0) return 0
  const left = mask.slice()
  for (const f of families) removeLines(left, width, height, f)
  let kept = 0
  for (let i = 0; i < left.length; i++) kept += left[i]!
  return (total - kept) / total
}

const neutral = (lab: Lab) => lch(lab).c < NEUTRAL_CHROMA

/** Which inks become layers (see the top of this file). */
export function decideLayers(inks: InkToJudge[], width: number, height: number): LayerDecision {
  const allInk = inks.reduce((s, i) => s + i.share, 0) || 1
  const leftOut: LayerDecision['leftOut'] = []
  const kept: number[] = []
  inks.forEach((ink, index) => {
    if (ink.share / allInk < MIN_LAYER_SHARE) leftOut.push({ index, reason: 'too small' })
    else if (paperLineShare(ink.mask, width, height) >= LINE_SHARE) leftOut.push({ index, reason: 'paper lines' })
    else kept.push(index)
  })
  const greys = kept.filter((i) => neutral(inks[i]!.lab))
  const groups: number[][] = []
  for (const i of kept) {
    if (greys.includes(i)) { if (i === greys[0]) groups.push(greys) } else groups.push([i])
  }
  const layered = groups.length >= 2
  const why = layered
    ? `${groups.length} inks become layers${leftOut.length ? `; ${leftOut.length} colour${leftOut.length > 1 ? 's' : ''} left out (${leftOut.map((l) => `${inks[l.index]!.name}: ${l.reason}`).join(', ')})` : ''}.`
    : `One ink once ${leftOut.length ? 'the paper\'s lines, small colours and ' : ''}greys are taken together: one colour.`
  return { layered, groups, leftOut, why }
}
