// What the outline pipeline reports for a revision or a preview.
import type { CornersSetting, DropoutSetting, ThresholdSetting } from '../utils/settings'

/** A setting value as written to pin a choice (never 'auto'). */
type Pinned<T> = Exclude<T, { mode: 'auto' } | 'auto'>

/**
 * One clean-up choice of a run: which setting, the value used (written exactly as the
 * setting would be written to pin it), whether the pipeline chose it ('auto' in the
 * settings) or the designer did, and why, in one plain sentence.
 */
export type CleanUpChoice =
  | { setting: 'corners', automatic: boolean, value: Pinned<CornersSetting>, reason: string }
  | { setting: 'lightingEvening', automatic: boolean, value: { mode: 'on' | 'off', strength: number }, reason: string }
  | { setting: 'inkColour', automatic: boolean, value: 'dark' | 'colour', reason: string }
  | { setting: 'dropoutColour', automatic: boolean, value: Pinned<DropoutSetting>, reason: string }
  | { setting: 'paperLines', automatic: boolean, value: 'keep' | 'remove', reason: string }
  | { setting: 'threshold', automatic: boolean, value: Pinned<ThresholdSetting>, reason: string }
  | { setting: 'marginMm', automatic: false, value: number, reason: string }
  | { setting: 'thickenToMm', automatic: false, value: number | null, reason: string }

export type CleanUpSetting = CleanUpChoice['setting']

export interface Measurements {
  widthMm: number
  heightMm: number
  /** Ink area with holes subtracted, mm² (from the clean vector's curves). */
  inkAreaMm2: number
  /** Total length of every outline, outer and hole alike, mm. */
  cutLengthMm: number
  pieces: number
  holes: number
  /** Segments (lines and cubic Béziers) in the clean vector. */
  nodes: number
  /** Width of the thinnest stroke, mm (definition in server/pipeline/geometry.ts); null without ink. */
  narrowestFeatureMm: number | null
  /** Pieces whose outline encloses less than `smallPieceLimitMm2`. */
  smallPieces: number
  smallPieceLimitMm2: number
  /** Intersection over union of the clean vector rasterised back and the prepared bitmap. */
  fidelity: number
  /**
   * The threshold used (automatic or manual), grey level 0–255; ink is grey ≤ threshold. With
   * the adaptive method every pixel has its own level: this is then Otsu's level of the same
   * grey image, a starting point for a manual threshold.
   */
  threshold: number
  pxPerMm: number
  preparedWidthPx: number
  preparedHeightPx: number
}

export interface StageTimings {
  prepareMs: number
  traceMs: number
  cleanMs: number
  measureMs: number
  totalMs: number
}

export interface EngineVersions {
  sharp: string
  vips: string
  potrace: string
  svgo: string
  /** The font library, for revisions generated from a font's outlines. */
  opentype?: string
}
