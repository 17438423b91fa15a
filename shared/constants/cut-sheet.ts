// The options an operator sets on a cut sheet, in millimetres, with their defaults.
export const CUT_SHEET_LIMITS = {
  /** Weeding frame around each copy; 0 = none. */
  frame: { min: 0, max: 20, default: 0 },
  /** Between neighbouring copies. */
  gap: { min: 0, max: 50, default: 3 },
  /** Between the copies and the sheet's edge. */
  margin: { min: 0, max: 50, default: 5 },
} as const

export type CutSheetDimension = keyof typeof CUT_SHEET_LIMITS

/** Weeding lines in the waste film: least distance to any copy, and widest strip between lines, mm. */
export const WEEDING_LINE_LIMITS = {
  clearance: { min: 0.2, max: 10, default: 1 },
  spacing: { min: 5, max: 200, default: 25 },
} as const
