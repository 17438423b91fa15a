// The whole pipeline for one source and one set of settings: automatic clean-up and prepared
// bitmap of the drawing (trimmed to its ink: the requested width is the drawing's) → outline →
// clean vector → measurements. Pure (no Nuxt, no storage): the worker pool runs it, and so do
// the tests. A source that cannot become a decal is refused with a NotADrawingError.
import sharp from 'sharp'
import type { CleanUpChoice, EngineVersions, Measurements, StageTimings } from '../../shared/types/pipeline'
import { prepareDrawing, type PrepareOptions } from './prepare'
import { traceBitmap, outlineToSvg } from './trace'
import { cleanVector } from './clean'
import { measureOutline } from './measure'
import type { PipelineSettingsInput } from '../../shared/utils/settings'
export { PREVIEW_SOURCE_SIDE } from '../../shared/utils/settings'
import { ENGINE_VERSIONS_BASE } from './versions'

/** Below this area a piece of film is lost when weeding, unless the film says otherwise (common practice, a rule of thumb). */
export const DEFAULT_SMALL_PIECE_MM2 = 1

export interface RunRequest {
  source: Uint8Array
  settings: PipelineSettingsInput
  /** Width of the drawing's ink, mm (the decal is this plus the settings' margin on each side). */
  widthMm: number
  /** 'preview' works at screen resolution and skips nothing a designer reads. */
  purpose: 'revision' | 'preview'
  smallPieceMm2?: number
  /** The source's content hash, so repeated previews of one source reuse the sheet's reading. */
  sourceKey?: string
}

export interface RunResult {
  preparedPng: Uint8Array
  /** The tracer's own outline, in prepared-bitmap pixels; empty for a preview (never stored). */
  rawOutlineSvg: string
  cleanSvg: string
  measurements: Measurements
  histogram: number[]
  timings: StageTimings
  engineVersions: EngineVersions
  /** The clean-up's choices: each setting's value used and why (see CleanUpChoice). */
  choices: CleanUpChoice[]
}

/** Preview resolution: enough for a screen, small enough to answer while a slider moves. */
export const PREVIEW_OPTIONS: PrepareOptions = { minPxPerMm: 4, maxPxPerMm: 6, maxPixels: 1_000_000, fastPng: true }

export async function runPipeline(req: RunRequest): Promise<RunResult> {
  const t0 = performance.now()
  const limit = req.smallPieceMm2 ?? DEFAULT_SMALL_PIECE_MM2
  const prepared = await prepareDrawing(req.source, req.settings, req.widthMm, { ...(req.purpose === 'preview' ? PREVIEW_OPTIONS : {}), smallPieceMm2: limit, sourceKey: req.sourceKey })
  const t1 = performance.now()
  const outline = traceBitmap(prepared, prepared.settings)
  const t2 = performance.now()
  const clean = cleanVector(outline)
  const t3 = performance.now()
  const figures = measureOutline(clean, prepared, limit)
  const t4 = performance.now()
  return {
    preparedPng: new Uint8Array(prepared.png.buffer, prepared.png.byteOffset, prepared.png.byteLength),
    rawOutlineSvg: req.purpose === 'revision' ? outlineToSvg(outline) : '',
    cleanSvg: clean.svg,
    histogram: Array.from(prepared.histogram),
    measurements: {
      widthMm: clean.widthMm,
      heightMm: clean.heightMm,
      inkAreaMm2: figures.inkAreaMm2,
      cutLengthMm: figures.cutLengthMm,
      pieces: figures.pieces,
      holes: figures.holes,
      nodes: figures.nodeCount,
      narrowestFeatureMm: figures.narrowestFeatureMm,
      smallPieces: figures.smallPieces,
      smallPieceLimitMm2: limit,
      fidelity: figures.fidelity,
      threshold: prepared.threshold,
      pxPerMm: prepared.pxPerMm,
      preparedWidthPx: prepared.width,
      preparedHeightPx: prepared.height,
    },
    timings: { prepareMs: t1 - t0, traceMs: t2 - t1, cleanMs: t3 - t2, measureMs: t4 - t3, totalMs: t4 - t0 },
    engineVersions: { ...ENGINE_VERSIONS_BASE, sharp: sharp.versions.sharp ?? '', vips: sharp.versions.vips },
    choices: prepared.choices,
  }
}
