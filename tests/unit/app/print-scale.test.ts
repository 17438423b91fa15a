import { describe, expect, it } from 'vitest'
import { printScale } from '../../../app/utils/print-scale'

describe('printScale', () => {
  it('picks the first round scale at which the sheet fits the box (hand-worked cases)', () => {
    // 300 × 200 mm into 180 × 110 mm: needs 1 : 1.82, so 1 : 2 (150 × 100 mm on paper).
    expect(printScale(300, 200, 180, 110)).toBe(2)
    // 600 × 400 mm: needs 1 : 3.64, so 1 : 4.
    expect(printScale(600, 400, 180, 110)).toBe(4)
    // A small sheet that fits as it is stays full size.
    expect(printScale(150, 100, 180, 110)).toBe(1)
    // Exactly 1 : 2.5 (450 × 275 into 180 × 110).
    expect(printScale(450, 275, 180, 110)).toBe(2.5)
    // Larger than any listed scale: a whole number that fits.
    expect(printScale(18_000, 1_000, 180, 110)).toBe(100)
  })
})
