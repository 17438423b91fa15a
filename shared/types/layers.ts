// Colour layers (migration 0013): the shapes the database, the API and the pages share.
import type { Measurements } from './pipeline'
import type { ColourSettings } from '../utils/colour-settings'
import type { MarksCut } from '../utils/cut-time'

/** At most this many inks become layers of one decal. */
export const MAX_LAYERS = 6

/**
 * A layer's measurements: the single-colour ones less the grey threshold (of the layer as cut,
 * without the registration marks), and the marks cut on the layer's sheet beside it (left out
 * of layers stored before they were measured; see marksOfJob in server/jobs/service.ts).
 */
export type LayerMeasurements = Omit<Measurements, 'threshold'> & { marks?: MarksCut }

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
  /**
   * Where the drawing sits: the canvas every layer shares (marks included), the drawing's own
   * size and its shift into that canvas, and the marks' centres, all in mm.
   */
  frame?: { widthMm: number; heightMm: number; drawingWidthMm: number; drawingHeightMm: number; shift: { x: number; y: number }; marks: { x: number; y: number }[] }
  /**
   * The part of the picture the drawing was cut from (fractions of its width and height): of
   * the upright source, or of the straightened sheet when `straightened`; null when the
   * designer cropped.
   */
  trim?: { x: number; y: number; width: number; height: number } | null
  /** The inks were separated on the sheet the clean-up straightened or turned (the same frame as the one-colour drawing's). */
  straightened?: boolean
  /** The designer's colour settings from the bench, when they set any (the bench starts from them). */
  asked?: ColourSettings
  detail?: Record<string, unknown>
}

/** One layer of a layered revision as the API answers it, bottom first. */
export interface RevisionLayerInfo {
  /** 0 = bottom. */
  position: number
  name: string
  hex: string
  measurements: LayerMeasurements
  /** The layer's clean vector as cut (with the registration marks), its prepared bitmap and raw outline (null for a generated layer). */
  files: { vector: string; prepared: string | null; outline: string | null }
}
