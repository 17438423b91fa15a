// Zoom and pan shared by the bench's panels, and the crop rectangle drawn on the source.
//
// Every panel shows the same "world": the source in its own pixels, turned upright. The view
// is a zoom factor and the world point at the panel's centre, so panels of different sizes
// stay in step: each fits the whole source at zoom 1 and applies the same zoom and centre.
import type { CropSetting } from './bench-settings'

export interface ViewState {
  /** 1 = the whole source fits the panel. */
  zoom: number
  /** World point (source pixels) at the panel's centre. */
  cx: number
  cy: number
}

export interface ViewSize { width: number; height: number }
export interface ViewPoint { x: number; y: number }

export const ZOOM_MIN = 0.5
export const ZOOM_MAX = 32
/** One press of + or −, or one wheel notch, zooms by this factor. */
export const ZOOM_STEP = 1.25
/** One press of an arrow key moves the view by this share of what is visible. */
export const PAN_STEP = 0.1

export function fitView(world: ViewSize): ViewState {
  return { zoom: 1, cx: world.width / 2, cy: world.height / 2 }
}

/** Screen pixels per world pixel at zoom 1: the whole world fits the panel. */
export function fitScale(panel: ViewSize, world: ViewSize): number {
  if (!(panel.width > 0 && panel.height > 0 && world.width > 0 && world.height > 0)) return 1
  return Math.min(panel.width / world.width, panel.height / world.height)
}

export function viewScale(view: ViewState, panel: ViewSize, world: ViewSize): number {
  return fitScale(panel, world) * view.zoom
}

export function clampView(view: ViewState, world: ViewSize): ViewState {
  const zoom = Math.min(ZOOM_MAX, Math.max(ZOOM_MIN, Number.isFinite(view.zoom) ? view.zoom : 1))
  const cx = Math.min(world.width, Math.max(0, Number.isFinite(view.cx) ? view.cx : world.width / 2))
  const cy = Math.min(world.height, Math.max(0, Number.isFinite(view.cy) ? view.cy : world.height / 2))
  return { zoom, cx, cy }
}

export function worldToScreen(p: ViewPoint, view: ViewState, panel: ViewSize, world: ViewSize): ViewPoint {
  const s = viewScale(view, panel, world)
  return { x: (p.x - view.cx) * s + panel.width / 2, y: (p.y - view.cy) * s + panel.height / 2 }
}

export function screenToWorld(p: ViewPoint, view: ViewState, panel: ViewSize, world: ViewSize): ViewPoint {
  const s = viewScale(view, panel, world)
  return { x: view.cx + (p.x - panel.width / 2) / s, y: view.cy + (p.y - panel.height / 2) / s }
}

/** Zoom by `factor`, keeping the world point under `at` (screen, in the panel) where it is. */
export function zoomAt(view: ViewState, factor: number, at: ViewPoint, panel: ViewSize, world: ViewSize): ViewState {
  const under = screenToWorld(at, view, panel, world)
  const zoom = Math.min(ZOOM_MAX, Math.max(ZOOM_MIN, view.zoom * factor))
  const s = fitScale(panel, world) * zoom
  return clampView({ zoom, cx: under.x - (at.x - panel.width / 2) / s, cy: under.y - (at.y - panel.height / 2) / s }, world)
}

/** Zoom about the panel's centre (the + and − buttons and keys). */
export function zoomCentre(view: ViewState, factor: number, world: ViewSize): ViewState {
  return clampView({ ...view, zoom: view.zoom * factor }, world)
}

/** Drag by (dx, dy) screen pixels: the picture follows the pointer. */
export function panByScreen(view: ViewState, dx: number, dy: number, panel: ViewSize, world: ViewSize): ViewState {
  const s = viewScale(view, panel, world)
  return clampView({ ...view, cx: view.cx - dx / s, cy: view.cy - dy / s }, world)
}

/** Arrow keys: move what is visible by PAN_STEP of the world's extent at this zoom. */
export function panByStep(view: ViewState, dirX: number, dirY: number, world: ViewSize): ViewState {
  return clampView({
    ...view,
    cx: view.cx + (dirX * PAN_STEP * world.width) / view.zoom,
    cy: view.cy + (dirY * PAN_STEP * world.height) / view.zoom,
  }, world)
}

/**
 * The same view for a panel showing another world (the decal beside the source): the same
 * zoom, and the centre at the same place relative to each world's size.
 */
export function viewBetween(view: ViewState, from: ViewSize, to: ViewSize): ViewState {
  if (from.width === to.width && from.height === to.height) return view
  const fx = from.width > 0 ? view.cx / from.width : 0.5
  const fy = from.height > 0 ? view.cy / from.height : 0.5
  return { zoom: view.zoom, cx: fx * to.width, cy: fy * to.height }
}

/** A view that frames a rectangle of the world (e.g. the crop) in a panel. */
export function frameRect(rect: CropSetting, panel: ViewSize, world: ViewSize): ViewState {
  const fit = fitScale(panel, world)
  const want = Math.min(panel.width / rect.width, panel.height / rect.height) * 0.92
  return clampView({ zoom: want / fit, cx: rect.x + rect.width / 2, cy: rect.y + rect.height / 2 }, world)
}

/** The CSS transform that puts a world-sized stage (top-left origin) where the view says. */
export function stageTransform(view: ViewState, panel: ViewSize, world: ViewSize): string {
  const s = viewScale(view, panel, world)
  const tx = panel.width / 2 - view.cx * s
  const ty = panel.height / 2 - view.cy * s
  return `translate(${tx.toFixed(2)}px, ${ty.toFixed(2)}px) scale(${s.toFixed(6)})`
}

/** Smallest crop side, source pixels: a smaller drag is taken for a click. */
export const CROP_MIN_PX = 4

/**
 * The crop rectangle spanned by two world points, in whole source pixels inside the source:
 * the outer edges are rounded outwards so the rectangle covers what was dragged over.
 * Null when it is too small to be meant.
 */
export function cropFromPoints(a: ViewPoint, b: ViewPoint, world: ViewSize): CropSetting | null {
  const W = Math.round(world.width)
  const H = Math.round(world.height)
  const x0 = Math.max(0, Math.min(W, Math.floor(Math.min(a.x, b.x))))
  const y0 = Math.max(0, Math.min(H, Math.floor(Math.min(a.y, b.y))))
  const x1 = Math.max(0, Math.min(W, Math.ceil(Math.max(a.x, b.x))))
  const y1 = Math.max(0, Math.min(H, Math.ceil(Math.max(a.y, b.y))))
  const width = x1 - x0
  const height = y1 - y0
  if (width < CROP_MIN_PX || height < CROP_MIN_PX) return null
  return { x: x0, y: y0, width, height }
}

/** A crop typed in by hand, made to lie inside the source (whole pixels, at least 1 × 1). */
export function fitCrop(c: CropSetting, world: ViewSize): CropSetting {
  const W = Math.max(1, Math.round(world.width))
  const H = Math.max(1, Math.round(world.height))
  const x = Math.min(W - 1, Math.max(0, Math.round(c.x)))
  const y = Math.min(H - 1, Math.max(0, Math.round(c.y)))
  const width = Math.min(W - x, Math.max(1, Math.round(c.width)))
  const height = Math.min(H - y, Math.max(1, Math.round(c.height)))
  return { x, y, width, height }
}
