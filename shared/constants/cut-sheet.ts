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
