// The frame: the rectangle the rest of the clean-up works on, and how its pixels map back to
// the upright (and cropped) source. It is the source itself, or the straightened sheet, then
// turned by quarter turns and a fine angle (clockwise, about its centre, on a canvas that
// holds the whole turned picture; corners the turn uncovers are paper).
import { IDENTITY, apply, invert, isIdentity, multiply, rotation, scaling, translation, type Mat3, type Pt } from './homography'
import type { SheetFrame } from './sheet'

export interface Frame {
  width: number
  height: number
  /** Frame pixel → source pixel (continuous coordinates); identity when the frame is the source. */
  toSource: Mat3
  /** True when the frame is the source as it is (no straightening, no turn). */
  identity: boolean
  /**
   * The frame before turning (the source, or the cut-out sheet): frame pixel → its pixel,
   * and its size. Points of the frame outside it are paper.
   */
  base: { toBase: Mat3, width: number, height: number }
}

export function turnFrame(base: { width: number, height: number, toSource: Mat3 }, quarterTurns: number, fineAngleDeg: number): Frame {
  const deg = ((quarterTurns % 4) + 4) % 4 * 90 + fineAngleDeg
  if (deg === 0) return { ...base, identity: isIdentity(base.toSource), base: { toBase: IDENTITY, width: base.width, height: base.height } }
  const { width: w, height: h } = base
  const t = (deg * Math.PI) / 180
  const c = Math.abs(Math.cos(t)), s = Math.abs(Math.sin(t))
  // Exact quarter turns keep whole-pixel sides.
  const exact = fineAngleDeg === 0
  const width = exact ? (quarterTurns % 2 ? h : w) : Math.max(1, Math.round(w * c + h * s))
  const height = exact ? (quarterTurns % 2 ? w : h) : Math.max(1, Math.round(w * s + h * c))
  // base → turned: move the centre to the origin, turn, move to the new centre
  const forward = multiply(translation(width / 2, height / 2), multiply(rotation(deg), translation(-w / 2, -h / 2)))
  const back = invert(forward)
  return { width, height, toSource: multiply(base.toSource, back), identity: false, base: { toBase: back, width: w, height: h } }
}

export function sourceFrame(width: number, height: number): Frame {
  return { width, height, toSource: IDENTITY, identity: true, base: { toBase: IDENTITY, width, height } }
}

export function fromSheet(sheet: SheetFrame): { width: number, height: number, toSource: Mat3 } {
  return { width: sheet.width, height: sheet.height, toSource: sheet.toSource }
}

/** Bounding box, in source pixels, of a rectangle of the frame (frame pixels). */
export function sourceBox(frame: Frame, x0: number, y0: number, x1: number, y1: number): { x0: number, y0: number, x1: number, y1: number } {
  // A homography maps straight lines to straight lines, so the box of the four mapped corners
  // holds the whole mapped rectangle (as long as it stays on one side of the horizon).
  const pts: Pt[] = [{ x: x0, y: y0 }, { x: x1, y: y0 }, { x: x1, y: y1 }, { x: x0, y: y1 }].map((p) => apply(frame.toSource, p))
  return {
    x0: Math.min(...pts.map((p) => p.x)), y0: Math.min(...pts.map((p) => p.y)),
    x1: Math.max(...pts.map((p) => p.x)), y1: Math.max(...pts.map((p) => p.y)),
  }
}

export interface Rect { left: number, top: number, width: number, height: number }

/**
 * How a region of the frame (frame pixels) is read onto a toW × toH grid from a source of
 * srcW × srcH pixels: the source rectangle that covers it (two pixels spare for the filter),
 * the size to resample that rectangle to first (libvips, close to the grid's scale, never
 * enlarged), and the maps for warpBilinear from a grid pixel into that copy and into the base
 * frame (what lies outside it is fill). Shared by the one-colour clean-up and the colour layers,
 * so both read the same frame the same way.
 */
export function frameReadPlan(frame: Frame, region: Rect, toW: number, toH: number, srcW: number, srcH: number) {
  const b = sourceBox(frame, region.left, region.top, region.left + region.width, region.top + region.height)
  const sx0 = Math.max(0, Math.floor(b.x0) - 2), sy0 = Math.max(0, Math.floor(b.y0) - 2)
  const sx1 = Math.min(srcW, Math.ceil(b.x1) + 2), sy1 = Math.min(srcH, Math.ceil(b.y1) + 2)
  const source: Rect = { left: sx0, top: sy0, width: Math.max(1, sx1 - sx0), height: Math.max(1, sy1 - sy0) }
  const si = Math.min(1, toW / region.width)
  const nearW = Math.max(1, Math.round(source.width * si)), nearH = Math.max(1, Math.round(source.height * si))
  // grid pixel → frame pixel → source pixel → pixel of the resampled copy
  const gridToFrame = multiply(translation(region.left, region.top), scaling(region.width / toW, region.height / toH))
  const outToIn = multiply(scaling(nearW / source.width, nearH / source.height), multiply(translation(-sx0, -sy0), multiply(frame.toSource, gridToFrame)))
  const within = { map: multiply(frame.base.toBase, gridToFrame), width: frame.base.width, height: frame.base.height }
  return { source, nearW, nearH, outToIn, within }
}
