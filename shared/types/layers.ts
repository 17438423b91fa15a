// Colour layers (migration 0013): the shapes the database, the API and the pages share.
import type { Measurements } from './pipeline'

/** At most this many inks become layers of one decal. */
export const MAX_LAYERS = 6

/** A layer's measurements: the single-colour ones less the grey threshold. */
export type LayerMeasurements = Omit<Measurements, 'threshold'>

/** How a lower layer meets the ones above it: runs on under them, or is cut out where they sit. */
export type LayerStackMode = 'under' | 'knock-out'

/**
 * What a layered revision was asked and what was found, kept with the revision: the
 * separation's sentence and inks, the stack (order, mode, overlap in mm) and the marks.
 * Pipeline-specific detail may be added under `detail`.
 */
export interface RevisionColour {
  /** One sentence saying how many inks were found and which, e.g. "3 inks: red, blue and yellow on white paper". */
  sentence: string
  /** Bottom first, as layered. */
  inks: { name: string; hex: string; share: number }[]
  stack: { mode: LayerStackMode; overlapMm: number }[]
  marks: boolean
  detail?: Record<string, unknown>
}
