// Generated plates, measured from their own vectors, on an invented robot checked against the FTC preset.
import { describe, expect, it } from 'vitest'
import { loadPlateFont } from '../../../server/plates/font'
import { generatePlate } from '../../../server/plates/generate'
import { measureLayer, plateFigures } from '../../../server/plates/measure'
import { checkRobotPlates, scaleToPlacement, type PlacedPlate } from '../../../shared/plates/check'
import { presetProfile } from '../../../shared/plates/profiles'

describe('generated plates through the robot check', () => {
  it('passes at the generated size and fails when placed too small', async () => {
    const ftc = presetProfile('ftc-2025-26')!
    const p = generatePlate({ teamNumber: '5150', profile: ftc, font: loadPlateFont(), background: { colour: 'blue' } })
    const figures = plateFigures(await measureLayer(p.layers.find((l) => l.role === 'numerals')!.svg, { stroke: false }))
    const placed = (side: PlacedPlate['side'], widthMm: number): PlacedPlate => {
      const f = scaleToPlacement(figures, p.widthMm, widthMm)
      return { side, ...f, backgroundColour: 'Ocean blue', numeralColour: 'White', quantity: 1, spares: 2 }
    }
    const ok = checkRobotPlates(ftc, [placed('front', p.widthMm), placed('right', p.widthMm)])
    expect(ok.filter((r) => !r.passed)).toEqual([])
    // Shrunk to 90 %: numerals under 1.75 in, the plate under 6.5 × 2.5 in, the margin under ¼ in.
    const small = checkRobotPlates(ftc, [placed('front', p.widthMm * 0.9), placed('right', p.widthMm)])
    expect(small.filter((r) => !r.passed).map((r) => r.rule)).toEqual(['numeral-height', 'plate-size', 'margin'])
  })
})
