import { describe, expect, it } from 'vitest'
import { benchWarnings } from '../../../app/utils/bench-warnings'
import type { Measurements } from '../../../shared/types/pipeline'

const m = (widthMm: number, heightMm: number): Measurements => ({
  widthMm, heightMm, inkAreaMm2: 100, cutLengthMm: 100, pieces: 1, holes: 0, nodes: 10, narrowestFeatureMm: 5,
  smallPieces: 0, smallPieceLimitMm2: 1, fidelity: 0.99, threshold: 128, pxPerMm: 10, preparedWidthPx: 10, preparedHeightPx: 10,
})

describe('the laser work area warning', () => {
  const ctx = { sheetMm: { width: 1000, height: 1000 }, workAreaMm: { width: 400, height: 300 } }
  it('warns when the design fits the bed neither way round, and names the width as the fix', () => {
    const w = benchWarnings(m(420, 100), ctx).find((x) => x.id === 'beyond-work-area')
    expect(w?.fix).toBe('widthMm')
    expect(w?.text).toMatch(/400 × 300 mm work area/)
  })
  it('is quiet when the design fits turned, or when no work area is recorded', () => {
    // 350 × 390: as drawn 390 deep > 300; turned 390 wide ≤ 400 but 350 deep > 300 — fits neither way.
    expect(benchWarnings(m(350, 390), ctx).some((x) => x.id === 'beyond-work-area')).toBe(true)
    // 290 × 390: turned, 390 wide ≤ 400 and 290 deep ≤ 300 — fits.
    expect(benchWarnings(m(290, 390), ctx).some((x) => x.id === 'beyond-work-area')).toBe(false)
    expect(benchWarnings(m(5000, 5000), { sheetMm: { width: 9000, height: 9000 } }).some((x) => x.id === 'beyond-work-area')).toBe(false)
  })
})
