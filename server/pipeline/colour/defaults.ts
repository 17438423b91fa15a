// The colour layers' settings and their defaults, in a module of their own (no geometry
// imported), so the server can read them without the worker threads' libraries.

/** Largest overlap accepted, mm. */
export const MAX_OVERLAP_MM = 5

export type StackMode = 'under' | 'knock-out'

export interface StackSettings {
  mode: StackMode
  /** How far a lower layer runs on under the layers above it, mm. */
  overlapMm: number
}

/** Our default: a lower layer runs 0.5 mm under the one above (hand-laid film slips about that much). */
export const DEFAULT_STACK: StackSettings = Object.freeze({ mode: 'under', overlapMm: 0.5 }) as StackSettings

export interface MarkSettings {
  enabled: boolean
  /** Gap between the design's box and a mark's outer edge, mm. */
  clearanceMm: number
  /** Outer diameter of the ring, mm. */
  sizeMm: number
}

/** Our defaults: a 6 mm ring 4 mm clear of the design. */
export const DEFAULT_MARKS: MarkSettings = Object.freeze({ enabled: true, clearanceMm: 4, sizeMm: 6 }) as MarkSettings
export const MARK_LIMITS = { clearanceMm: { min: 1, max: 50 }, sizeMm: { min: 3, max: 30 } } as const
