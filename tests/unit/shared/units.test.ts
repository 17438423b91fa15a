import { describe, expect, it } from 'vitest'
import {
  CSS_PX_PER_INCH, MM_PER_INCH, cssPxToMm, mmToCssPx, mmToPx, preparedSize, pxToMm,
} from '../../../shared/utils/units'

describe('mm ↔ px', () => {
  it('uses the CSS absolute-length anchors', () => {
    // W3C CSS Values and Units Module Level 3, §absolute lengths: 1in = 2.54cm = 25.4mm = 96px
    expect(MM_PER_INCH).toBe(25.4)
    expect(CSS_PX_PER_INCH).toBe(96)
    expect(mmToCssPx(25.4)).toBeCloseTo(96, 12)
    expect(cssPxToMm(96)).toBeCloseTo(25.4, 12)
    // same source: 1cm = 96px / 2.54, so 10mm = 37.795… px
    expect(mmToCssPx(10)).toBeCloseTo(96 / 2.54, 12)
    // same source: 1pt = 1/72 in = 4/3 px (from memory), so 72pt = 96px = 25.4mm
    expect(cssPxToMm((72 * 4) / 3)).toBeCloseTo(25.4, 12)
    // round trip
    for (const mm of [0, 0.01, 1, 3.3, 150, 1234.5]) expect(cssPxToMm(mmToCssPx(mm))).toBeCloseTo(mm, 10)
  })

  it('converts bitmap pixels at a given resolution', () => {
    expect(mmToPx(150, 10)).toBe(1500)
    expect(pxToMm(1500, 10)).toBe(150)
    expect(pxToMm(mmToPx(12.34, 11.811), 11.811), 'round trip').toBeCloseTo(12.34, 12)
  })
})

describe('preparedSize', () => {
  it('gives a 150 mm design at least 1500 px (10 px/mm)', () => {
    // A 12 MP phone photo (4000 × 3000) at 150 mm: 26.7 px/mm available, kept at ≥ 10 px/mm.
    const s = preparedSize({ sourceWidthPx: 4000, sourceHeightPx: 3000, targetWidthMm: 150 })
    expect(s.widthPx).toBeGreaterThanOrEqual(1500)
    expect(s.pxPerMm).toBeGreaterThanOrEqual(10)
    expect(s.widthPx / s.pxPerMm).toBeCloseTo(150, 10)
    expect(s.heightMm).toBeCloseTo(s.heightPx / s.pxPerMm, 10)
    expect(s.heightMm).toBeCloseTo(112.5, 0) // aspect kept: 3000/4000 × 150
    expect(s.capped).toBe(false)
  })

  it('enlarges a coarse scan up to 10 px/mm', () => {
    const s = preparedSize({ sourceWidthPx: 800, sourceHeightPx: 600, targetWidthMm: 150 })
    expect(s.widthPx).toBe(1500)
    expect(s.heightPx).toBe(1125)
    expect(s.pxPerMm).toBe(10)
  })

  it('never enlarges more than 4×', () => {
    const s = preparedSize({ sourceWidthPx: 100, sourceHeightPx: 50, targetWidthMm: 150 })
    expect(s.widthPx).toBe(400)
    expect(s.heightPx).toBe(200)
    expect(s.scale).toBe(4)
  })

  it('shrinks a needlessly fine source to 12 px/mm', () => {
    const s = preparedSize({ sourceWidthPx: 6000, sourceHeightPx: 4000, targetWidthMm: 50 })
    expect(s.pxPerMm).toBe(12)
    expect(s.widthPx).toBe(600)
  })

  it('holds the pixel cap', () => {
    const s = preparedSize({ sourceWidthPx: 20000, sourceHeightPx: 15000, targetWidthMm: 1000, maxPixels: 16_000_000 })
    expect(s.capped).toBe(true)
    expect(s.widthPx * s.heightPx).toBeLessThanOrEqual(16_000_000)
    expect(s.widthPx * s.heightPx).toBeGreaterThan(15_900_000)
    expect(s.widthPx / s.heightPx).toBeCloseTo(4 / 3, 2)
    const small = preparedSize({ sourceWidthPx: 3000, sourceHeightPx: 3000, targetWidthMm: 300, maxPixels: 1_000_000 })
    expect(small.capped).toBe(true)
    expect(small.widthPx * small.heightPx).toBeLessThanOrEqual(1_000_000)
    expect(small.widthPx).toBe(1000)
  })

  it('refuses nonsense', () => {
    expect(() => preparedSize({ sourceWidthPx: 0, sourceHeightPx: 10, targetWidthMm: 10 })).toThrow(RangeError)
    expect(() => preparedSize({ sourceWidthPx: 10, sourceHeightPx: 10, targetWidthMm: 0 })).toThrow(RangeError)
  })
})
