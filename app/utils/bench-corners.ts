// The sheet's four corners on the tuning bench's source: where the handles sit, and how the
// keyboard, a drag or a click moves them. Points are in source pixels on the upright source
// (fractions allowed), in the order top left, top right, bottom right, bottom left of the
// sheet as it should come out (shared/utils/settings.ts, cornersSchema).
import type { CleanUpChoice } from '#shared/types/pipeline'
import type { PipelineSettings, SourcePoint } from '#shared/utils/settings'
import type { ViewPoint, ViewSize } from './bench-view'

export type Corners = [SourcePoint, SourcePoint, SourcePoint, SourcePoint]

export const CORNER_NAMES = ['top left', 'top right', 'bottom right', 'bottom left'] as const

/** A handle on the source panel (BenchHandles): a corner of the sheet, an edge of the crop. */
export interface BenchHandle {
  /** Where it sits, in source pixels. */
  at: ViewPoint
  /** What it is, in words ("top left corner"). */
  name: string
  /** Where it is, in words, for its label and the live region. */
  words: string
  testId: string
  shape?: 'round' | 'square'
}

/** Side of a handle's target on screen, px: at least WCAG 2.2's 24 × 24 px (SC 2.5.8). */
export const HANDLE_PX = 32

/**
 * An arrow key moves a corner one source pixel; with Shift, a fiftieth of the source's long
 * side (24 px on a 1200 px scan, 80 px on a 12 MP photo), so a corner crosses the picture in
 * about fifty presses.
 */
export function cornerStep(world: ViewSize, large: boolean): number {
  return large ? Math.max(2, Math.round(Math.max(world.width, world.height) / 50)) : 1
}

/** A point kept on the picture, to a tenth of a pixel (as the pipeline reports corners). */
export function onPicture(p: SourcePoint, world: ViewSize): SourcePoint {
  const r = (v: number, max: number) => Math.min(max, Math.max(0, Math.round(v * 10) / 10))
  return { x: r(p.x, world.width), y: r(p.y, world.height) }
}

/** The corners with one moved to `to` (kept on the picture). */
export function placeCorner(points: Corners, index: number, to: SourcePoint, world: ViewSize): Corners {
  const next = points.map((p) => ({ ...p })) as Corners
  next[index] = onPicture(to, world)
  return next
}

/** Arrow keys to a move (dx, dy) in source pixels; null for any other key. */
export function cornerKeyMove(key: string, shift: boolean, world: ViewSize): { dx: number; dy: number } | null {
  const s = cornerStep(world, shift)
  switch (key) {
    case 'ArrowLeft': return { dx: -s, dy: 0 }
    case 'ArrowRight': return { dx: s, dy: 0 }
    case 'ArrowUp': return { dx: 0, dy: -s }
    case 'ArrowDown': return { dx: 0, dy: s }
    default: return null
  }
}

export function moveCorner(points: Corners, index: number, dx: number, dy: number, world: ViewSize): Corners {
  const p = points[index]!
  return placeCorner(points, index, { x: p.x + dx, y: p.y + dy }, world)
}

/** Corners to start from when there are none: a little inside the picture's own corners. */
export function insetCorners(world: ViewSize, inset = 0.05): Corners {
  const x0 = world.width * inset, x1 = world.width * (1 - inset)
  const y0 = world.height * inset, y1 = world.height * (1 - inset)
  return [{ x: x0, y: y0 }, { x: x1, y: y0 }, { x: x1, y: y1 }, { x: x0, y: y1 }].map((p) => onPicture(p, world)) as Corners
}

export interface ShownCorners {
  points: Corners
  /** 'set': the settings hold them; 'found': the newest run found them (automatic). */
  source: 'set' | 'found'
}

/** The corners to draw: those set, or those the newest run found; null when there are none. */
export function shownCorners(settings: PipelineSettings, choices: readonly CleanUpChoice[] | null | undefined): ShownCorners | null {
  if (settings.corners.mode === 'manual') return { points: settings.corners.points, source: 'set' }
  if (settings.corners.mode === 'off') return null
  const c = choices?.find((x) => x.setting === 'corners')
  if (c?.setting === 'corners' && c.value.mode === 'manual') return { points: c.value.points, source: 'found' }
  return null
}

/** A corner's position in words, for its label and the live region. */
export function cornerWords(index: number, p: SourcePoint): string {
  return `${CORNER_NAMES[index]} corner at ${Math.round(p.x)}, ${Math.round(p.y)} px`
}
