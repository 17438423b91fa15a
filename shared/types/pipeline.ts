// What the outline pipeline reports for a revision or a preview.

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
  /** The threshold used (automatic or manual), grey level 0–255; ink is grey ≤ threshold. */
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
}
