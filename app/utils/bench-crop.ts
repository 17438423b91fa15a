// The crop's handles on the tuning bench's source: one on each edge and one for the whole
// rectangle, each moved by a drag, the arrow keys, or a click on it and a click where it goes
// (WCAG 2.2, 2.5.7: no move needs a drag). Crops are whole source pixels on the upright source.
import type { CropSetting } from './bench-settings'
import { CROP_MIN_PX, type ViewPoint, type ViewSize } from './bench-view'

export type CropHandle = 'left' | 'top' | 'right' | 'bottom' | 'whole'

export const CROP_HANDLES: readonly CropHandle[] = ['left', 'top', 'right', 'bottom', 'whole']

const HANDLE_NAMES: Record<CropHandle, string> = {
  left: 'left edge of the crop', top: 'top edge of the crop', right: 'right edge of the crop', bottom: 'bottom edge of the crop', whole: 'whole crop',
}

export function cropHandleName(h: CropHandle): string {
  return HANDLE_NAMES[h]
}

/** Where a handle sits: the middle of its edge, or the rectangle's centre. */
export function cropHandlePoint(c: CropSetting, h: CropHandle): ViewPoint {
  const cx = c.x + c.width / 2, cy = c.y + c.height / 2
  switch (h) {
    case 'left': return { x: c.x, y: cy }
    case 'right': return { x: c.x + c.width, y: cy }
    case 'top': return { x: cx, y: c.y }
    case 'bottom': return { x: cx, y: c.y + c.height }
    case 'whole': return { x: cx, y: cy }
  }
}

const clamp = (v: number, lo: number, hi: number) => Math.min(hi, Math.max(lo, v))

/**
 * The crop with one handle moved to `to` (source pixels): an edge moves across its own axis
 * only, the opposite edge stays, and the crop keeps at least CROP_MIN_PX a side; the whole
 * crop moves so its centre is at `to`, kept inside the source at its size.
 */
export function cropWithHandleAt(c: CropSetting, h: CropHandle, to: ViewPoint, world: ViewSize): CropSetting {
  const W = Math.max(CROP_MIN_PX, Math.round(world.width))
  const H = Math.max(CROP_MIN_PX, Math.round(world.height))
  const right = c.x + c.width, bottom = c.y + c.height
  switch (h) {
    case 'left': {
      const x = clamp(Math.round(to.x), 0, right - CROP_MIN_PX)
      return { ...c, x, width: right - x }
    }
    case 'right': {
      const r = clamp(Math.round(to.x), c.x + CROP_MIN_PX, W)
      return { ...c, width: r - c.x }
    }
    case 'top': {
      const y = clamp(Math.round(to.y), 0, bottom - CROP_MIN_PX)
      return { ...c, y, height: bottom - y }
    }
    case 'bottom': {
      const b = clamp(Math.round(to.y), c.y + CROP_MIN_PX, H)
      return { ...c, height: b - c.y }
    }
    case 'whole': {
      const width = Math.min(c.width, W), height = Math.min(c.height, H)
      return { x: clamp(Math.round(to.x - width / 2), 0, W - width), y: clamp(Math.round(to.y - height / 2), 0, H - height), width, height }
    }
  }
}

/** A handle's position in words, for its label and the live region. */
export function cropHandleWords(c: CropSetting, h: CropHandle): string {
  const p = cropHandlePoint(c, h)
  if (h === 'whole') return `whole crop, ${c.width} × ${c.height} px from ${c.x}, ${c.y}`
  return `${HANDLE_NAMES[h]} at ${Math.round(h === 'left' || h === 'right' ? p.x : p.y)} px`
}
