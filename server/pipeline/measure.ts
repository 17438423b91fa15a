// Every measurement of a clean vector against its prepared bitmap, in one call, so the tuning
// bench's preview and the saved revision compute them the same way.
import type { CleanVector } from './clean'
import { outlineFidelity } from './fidelity'
import { measureCurves, narrowestFeature, smallPieces, type OutlineMeasurements } from './geometry'

export interface OutlineFigures extends OutlineMeasurements {
  /** Intersection over union of the clean vector, rasterised back, and the prepared bitmap. */
  fidelity: number
  /** The narrowest stroke of what will be cut (the clean vector rasterised back), mm; null without ink. */
  narrowestFeatureMm: number | null
  /** Pieces smaller than smallPieceMm2. */
  smallPieces: number
  timings: { geometryMs: number, fidelityMs: number, narrowestMs: number }
}

export function measureOutline(
  clean: Pick<CleanVector, 'curvesMm' | 'widthMm' | 'heightMm'>,
  prepared: { bitmap: Uint8Array, width: number, height: number, pxPerMm: number },
  smallPieceMm2: number,
): OutlineFigures {
  const t0 = performance.now()
  const geometry = measureCurves(clean.curvesMm, 1)
  const small = smallPieces(clean.curvesMm, 1, smallPieceMm2).length
  const t1 = performance.now()
  const fid = outlineFidelity(clean, prepared)
  const t2 = performance.now()
  // Measured on what will be cut: specks the speck filter dropped do not count.
  const narrowest = narrowestFeature(fid.raster, prepared.width, prepared.height, prepared.pxPerMm)
  const t3 = performance.now()
  return {
    ...geometry,
    fidelity: fid.iou,
    narrowestFeatureMm: narrowest?.widthMm ?? null,
    smallPieces: small,
    timings: { geometryMs: t1 - t0, fidelityMs: t2 - t1, narrowestMs: t3 - t2 },
  }
}
