// What one sheet's files say, worked out once and written twice (svg.ts, dxf.ts): the
// designs placed on the sheet, where each copy goes, frames, weeding lines and label text.
import type { PreparedDesign } from './design'
import type { Point } from './path'
import type { Affine, Rect } from './place'

export interface PlanCopy {
  /** The copy's label; the SVG names it dw-copy-ID. */
  id: string
  designId: string
  /** Design coordinates → sheet coordinates (a rigid motion on the 0.01 mm grid). */
  transform: Affine
}

export interface PlanText {
  /** The SVG names it dw-label-ID. */
  id: string
  text: string
  /** Start of the baseline on the sheet, mm. */
  x: number
  y: number
  capHeightMm: number
  /** Length of the baseline the text is fitted to, mm. */
  widthMm: number
  /** Turned 90° clockwise (reads top to bottom). */
  turned: boolean
}

/** Everything one sheet's files say. */
export interface SheetPlan {
  number: number
  sheets: number
  widthMm: number
  heightMm: number
  strokeMm: number
  /** The designs placed on this sheet. */
  designs: PreparedDesign[]
  copies: PlanCopy[]
  frames: { id: string, rect: Rect }[]
  /** Open two-point polylines, mm. */
  weedingLines: Point[][]
  texts: PlanText[]
  /** One sentence or two for the files' comments. */
  notes: string
}
