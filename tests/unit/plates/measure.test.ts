import { describe, expect, it } from 'vitest'
import { loadPlateFont } from '../../../server/plates/font'
import { generatePlate } from '../../../server/plates/generate'
import { STROKE_PX_PER_MM, measureLayer, strokeWindows } from '../../../server/plates/measure'
import { lengthMm, presetProfile } from '../../../shared/plates/profiles'

const font = loadPlateFont()
const svgMm = (w: number, h: number, d: string) => `<svg xmlns="http://www.w3.org/2000/svg" width="${w}mm" height="${h}mm" viewBox="0 0 ${w} ${h}"><path fill-rule="evenodd" d="${d}"/></svg>\n`
const rect = (x: number, y: number, w: number, h: number) => `M${x} ${y}h${w}v${h}h${-w}z`

describe('strokeWindows', () => {
  it('pads each piece\'s box and merges boxes that overlap until none do', () => {
    const w = strokeWindows([
      { minX: 0, minY: 0, maxX: 10, maxY: 10 },
      { minX: 11, minY: 0, maxX: 20, maxY: 10 }, // 1 mm away: the padded boxes overlap
      { minX: 40, minY: 0, maxX: 50, maxY: 10 },
      { minX: 19, minY: 30, maxX: 41, maxY: 40 }, // reaches neither after padding
    ], 1)
    expect(w).toEqual([
      { minX: -1, minY: -1, maxX: 21, maxY: 11 },
      { minX: 39, minY: -1, maxX: 51, maxY: 11 },
      { minX: 18, minY: 29, maxX: 42, maxY: 41 },
    ])
    // a box joining two others merges all three
    expect(strokeWindows([{ minX: 0, minY: 0, maxX: 1, maxY: 1 }, { minX: 10, minY: 0, maxX: 11, maxY: 1 }, { minX: 1, minY: 0, maxX: 10, maxY: 1 }], 0.5)).toHaveLength(1)
  })
})

describe('measureLayer', () => {
  it('measures bars of known width, each in its own window, at 20 px/mm', async () => {
    // Handbook geometry: a bar's stroke is its width. 4.3 mm and 7 mm bars, a 5 mm ring.
    const d = rect(5, 5, 4.3, 40) + rect(30, 5, 7, 40) + rect(60, 5, 30, 30) + rect(65, 10, 20, 20)
    const m = await measureLayer(svgMm(100, 50, d))
    expect(m.strokePxPerMm).toBe(STROKE_PX_PER_MM)
    expect(m.narrowestFeatureMm).toBeCloseTo(4.3, 1)
    expect([m.pieces, m.holes]).toEqual([3, 1])
    expect(m.inkAreaMm2).toBeCloseTo(4.3 * 40 + 7 * 40 + 30 * 30 - 20 * 20, 9)
    expect(m.cutLengthMm).toBeCloseTo(2 * (4.3 + 40) + 2 * (7 + 40) + 4 * 30 + 4 * 20, 9)
    expect(m.tallestPieceMm).toBe(40)
    expect(m.marginMm).toBe(5)
    const thick = await measureLayer(svgMm(100, 50, rect(30, 5, 7, 40) + rect(60, 5, 30, 30) + rect(65, 10, 20, 20)))
    expect(thick.narrowestFeatureMm).toBeCloseTo(5, 1)
  })

  it('lowers the resolution of a window over the pixel limit, and says so', async () => {
    const m = await measureLayer(svgMm(100, 50, rect(10, 10, 80, 6)), { maxWindowPixels: 200_000 })
    expect(m.strokePxPerMm).toBeLessThan(STROKE_PX_PER_MM)
    expect(m.narrowestFeatureMm).toBeCloseTo(6, 0)
  })
})

describe('the plate font\'s strokes against the stroke rule', () => {
  // Only the FRC preset states a least stroke (½ in, R406, as issue 13 quotes it). The
  // narrowest stroke of an outline scaled evenly scales with it, so each digit is measured at
  // 25 mm and 20 px/mm (1 px = 0.05 mm) and the ratio carried to other heights; then the
  // narrowest digit is measured again as a 4 in FRC numeral.
  it('Work Sans Black meets the FRC stroke rule at the FRC height; it would fail below about 93 mm', async () => {
    const vex = presetProfile('v5rc-2024-25')!, frc = presetProfile('frc-2023')!
    const ratios: Array<[string, number]> = []
    for (const digit of '0123456789') {
      const p = generatePlate({ teamNumber: digit, profile: vex, font, numeralHeightMm: 25, background: null })
      const m = await measureLayer(p.layers[0]!.svg)
      expect(m.strokePxPerMm).toBe(20)
      ratios.push([digit, m.narrowestFeatureMm! / 25])
    }
    ratios.sort((a, b) => a[1] - b[1])
    const [narrowest, ratio] = ratios[0]!
    const least = lengthMm(frc.numerals.minStroke!.value) // 12.7 mm
    const frcHeight = lengthMm(frc.numerals.minHeight!.value) // 101.6 mm
    expect(ratio * frcHeight).toBeGreaterThanOrEqual(least)
    // The height below which the narrowest digit's stroke is under ½ in: about 93 mm (3.7 in),
    // measured along each stroke's skeleton, slanted strokes included (server/pipeline/skeleton.ts).
    const failsBelow = least / ratio
    expect(failsBelow).toBeGreaterThan(85)
    expect(failsBelow).toBeLessThan(100)
    // The same digit as a 4 in numeral on an FRC plate, measured from its own vector; kept to a
    // 1.5 MP window (about 12 px/mm) because the narrowest-feature search slows sharply with
    // stroke width in pixels.
    const big = generatePlate({ teamNumber: narrowest, profile: frc, font })
    const m = await measureLayer(big.layers[0]!.svg, { maxWindowPixels: 1_500_000 })
    expect(Math.abs(m.tallestPieceMm! - frcHeight)).toBeLessThanOrEqual(0.05)
    expect(m.narrowestFeatureMm!).toBeGreaterThanOrEqual(least)
    expect(Math.abs(m.narrowestFeatureMm! - ratio * frcHeight)).toBeLessThan(0.5)
  })
})
