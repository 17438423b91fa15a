// Sheet layout: how many copies of a decal fit on one sheet of film, where each one goes,
// and how many sheets a job needs. Pure arithmetic, shared by the server (cut sheet files)
// and the browser (the job page shows sheets needed and film usage).
//
// The rule, along one side of the sheet (length L, margin m on both edges, gap g between
// neighbours, copy length c):
//
//   n copies need n·c + (n − 1)·g ≤ L − 2m,  so  n = floor((L − 2m + g) / (c + g)).
//
// Columns use the sheet's width and the copy's width, rows the sheet's height and the copy's
// height. Both orientations are tried: as drawn, and turned 90° (width and height swapped);
// the one with more copies per sheet is kept, and on a tie the copy stays as drawn (fewer
// surprises for the operator). Then as many sheets as the copies need, each filled row by
// row from the top-left corner (the free film is left in one piece at the bottom and right).
//
// With a weeding frame (offset o around each copy's box), gap and margin are kept between the
// frames and from the frames to the edge: the same rule with gap + 2o and margin + o, which is
// the rule for a copy box enlarged by o on every side; placements stay the copy boxes' corners.
//
// Coordinates are sheet millimetres with y down, as in the SVG cut sheet.

export interface SheetLayoutInput {
  /** The copy's bounding box as drawn, mm. */
  copyWidthMm: number
  copyHeightMm: number
  /** Number of copies to place, a whole number ≥ 1. */
  copies: number
  /** The film sheet, mm. */
  sheetWidthMm: number
  sheetHeightMm: number
  /** Space between neighbouring copies, mm (≥ 0). */
  gapMm: number
  /** Space kept free along every edge of the sheet, mm (≥ 0). */
  marginMm: number
  /** May a copy be turned 90° when more then fit? Default true. */
  allowTurn?: boolean
  /**
   * A weeding frame this far (mm) around each copy's box, or null/0 for none. With a frame,
   * gap and margin are the film kept between neighbouring frames and between a frame and the
   * sheet's edge: the copies are laid out with gap + 2·frame between their boxes and
   * margin + frame from the edges, so the frames never cross or leave the sheet.
   */
  weedingFrameMm?: number | null
}

export interface CopyPlacement {
  /** Sheet number, counted from 1. */
  sheet: number
  /** Top-left corner of the copy's bounding box on the sheet, after turning, mm. */
  x: number
  y: number
  turned: boolean
}

export interface SheetLayout {
  /** Copies on a full sheet (columns × rows); 0 when a copy does not fit. */
  perSheet: number
  /** Copies side by side across the sheet's width. */
  columns: number
  /** Copies one above the other along the sheet's height. */
  rows: number
  /** True when every copy is turned 90° (clockwise) to fit more. */
  turned: boolean
  /** Sheets needed for all copies (0 when a copy does not fit). */
  sheets: number
  /** One entry per copy, in order: sheet by sheet, row by row, left to right. */
  placements: CopyPlacement[]
  /** Copy bounding-box area ÷ area of the sheets used × 100 (ink-free; 0 when it does not fit). */
  usagePercent: number
  fits: boolean
  /** Why nothing fits (present only when fits is false). */
  reason?: string
  /** The copy's size on the sheet, after turning, mm. */
  placedWidthMm: number
  placedHeightMm: number
}

/** Largest number of copies a single layout may place (a job is a handful of decals, not a roll). */
export const MAX_COPIES = 10_000

/**
 * Slack in the fit test, mm. Sizes arrive as decimals (0.1, 0.2 …) that binary floating point
 * cannot hold exactly, so a row that fits exactly on paper can compute as 2.9999999999999996
 * copies. A millionth of a millimetre is far below anything a laser or the 0.01 mm grid of
 * the files can tell apart.
 */
export const FIT_SLACK_MM = 1e-6

/** Copies along one side: floor((L − 2m + g) / (c + g)), never negative. */
export function copiesAlong(lengthMm: number, copyMm: number, gapMm: number, marginMm: number): number {
  const n = Math.floor((lengthMm - 2 * marginMm + gapMm + FIT_SLACK_MM) / (copyMm + gapMm))
  return Math.max(0, n)
}

function requirePositive(name: string, v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v) || v <= 0) {
    throw new RangeError(`${name} must be a positive number of millimetres (got ${String(v)}).`)
  }
  return v
}

function requireNonNegative(name: string, v: unknown): number {
  if (typeof v !== 'number' || !Number.isFinite(v) || v < 0) {
    throw new RangeError(`${name} must be zero or a positive number of millimetres (got ${String(v)}).`)
  }
  return v
}

const mm = (v: number) => `${Math.round(v * 100) / 100}`

export function layoutSheets(input: SheetLayoutInput): SheetLayout {
  const w = requirePositive('The copy width', input.copyWidthMm)
  const h = requirePositive('The copy height', input.copyHeightMm)
  const W = requirePositive('The sheet width', input.sheetWidthMm)
  const H = requirePositive('The sheet height', input.sheetHeightMm)
  const frame = requireNonNegative("The weeding frame's offset", input.weedingFrameMm ?? 0)
  // Between copy boxes and from the sheet's edges, measured from the copy boxes.
  const gap = requireNonNegative('The gap', input.gapMm) + 2 * frame
  const margin = requireNonNegative('The margin', input.marginMm) + frame
  const copies = input.copies
  if (typeof copies !== 'number' || !Number.isInteger(copies) || copies < 1) {
    throw new RangeError(`The number of copies must be a whole number of at least 1 (got ${String(copies)}).`)
  }
  if (copies > MAX_COPIES) throw new RangeError(`At most ${MAX_COPIES} copies can be laid out at once (got ${copies}).`)
  const allowTurn = input.allowTurn ?? true
  if (typeof allowTurn !== 'boolean') throw new RangeError('allowTurn must be true or false.')

  const asDrawn = { columns: copiesAlong(W, w, gap, margin), rows: copiesAlong(H, h, gap, margin) }
  const turnedFit = { columns: copiesAlong(W, h, gap, margin), rows: copiesAlong(H, w, gap, margin) }
  const drawnCount = asDrawn.columns * asDrawn.rows
  const turnedCount = turnedFit.columns * turnedFit.rows
  // Turn only when strictly more fit (a tie keeps the copy as drawn).
  const turned = allowTurn && turnedCount > drawnCount
  const chosen = turned ? turnedFit : asDrawn
  const perSheet = chosen.columns * chosen.rows
  const placedWidthMm = turned ? h : w
  const placedHeightMm = turned ? w : h

  if (perSheet === 0) {
    const usable = `${mm(Math.max(0, W - 2 * margin))} × ${mm(Math.max(0, H - 2 * margin))} mm`
    const framed = frame > 0 ? ` (with its ${mm(frame)} mm weeding frame)` : ''
    const what = `A copy of ${mm(w)} × ${mm(h)} mm${framed} does not fit on a ${mm(W)} × ${mm(H)} mm sheet with a ${mm(input.marginMm)} mm margin (usable area ${usable})`
    const reason = turnedCount > 0 && !allowTurn
      ? `${what}; it would fit turned 90°, but turning is off.`
      : `${what}, ${allowTurn ? 'not even turned 90°' : 'and turning is off'}.`
    return {
      perSheet: 0, columns: 0, rows: 0, turned: false, sheets: 0, placements: [],
      usagePercent: 0, fits: false, reason, placedWidthMm: w, placedHeightMm: h,
    }
  }

  const sheets = Math.ceil(copies / perSheet)
  const placements: CopyPlacement[] = []
  for (let i = 0; i < copies; i++) {
    const onSheet = i % perSheet
    const row = Math.floor(onSheet / chosen.columns)
    const col = onSheet % chosen.columns
    placements.push({
      sheet: Math.floor(i / perSheet) + 1,
      x: margin + col * (placedWidthMm + gap),
      y: margin + row * (placedHeightMm + gap),
      turned,
    })
  }
  const usagePercent = (copies * w * h) / (sheets * W * H) * 100
  return {
    perSheet, columns: chosen.columns, rows: chosen.rows, turned, sheets, placements,
    usagePercent, fits: true, placedWidthMm, placedHeightMm,
  }
}
