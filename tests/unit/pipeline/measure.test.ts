import { describe, expect, it } from 'vitest'
import { cleanVector } from '../../../server/pipeline/clean'
import { fidelity } from '../../../server/pipeline/fidelity'
import { measureCurves, smallPieces } from '../../../server/pipeline/geometry'
import { measureOutline } from '../../../server/pipeline/measure'
import { prepareBitmap } from '../../../server/pipeline/prepare'
import { traceBitmap } from '../../../server/pipeline/trace'
import { svgDoc, svgToPng } from './helpers'

describe('measureOutline', () => {
  it('gives the figures of the separate measurements, with fidelity as librsvg sees it', async () => {
    // a 40 mm disc with a 16 mm hole, a 1.2 mm bar and a 1.3 mm square (1.69 mm²), at 10 px/mm
    const png = await svgToPng(svgDoc(600, 500, '<circle cx="200" cy="250" r="200"/><circle cx="200" cy="250" r="80" fill="#fff"/>'
      + '<rect x="450" y="50" width="12" height="400"/><rect x="520" y="240" width="13" height="13"/>'))
    const prep = await prepareBitmap(png, { speckFilterMm2: 0.5 }, 60)
    const clean = cleanVector(traceBitmap(prep, prep.settings))
    const m = measureOutline(clean, prep, 2)
    expect(m).toMatchObject(measureCurves(clean.curvesMm, 1))
    expect(m.smallPieces).toBe(smallPieces(clean.curvesMm, 1, 2).length)
    expect(m.smallPieces).toBe(1)
    // Reference for fidelity: the clean vector rasterised by librsvg (fidelity.ts, rasteriseSvg).
    expect(Math.abs(m.fidelity - (await fidelity(clean.svg, prep)).iou)).toBeLessThan(0.002)
    // narrowest: the 1.2 mm bar, on what will be cut, within a pixel
    expect(Math.abs(m.narrowestFeatureMm! - 1.2)).toBeLessThanOrEqual(0.1)
  })
})
