import { describe, expect, it } from 'vitest'
import { cutPerCopy, estimateCutSeconds, formatDuration, MOVE_ALLOWANCE_S } from '../../../shared/utils/cut-time'

describe('cut time estimate', () => {
  it('is length × passes ÷ speed plus the stated allowance per piece and pass', () => {
    // Worked by hand: 1200 mm at 10 mm/s, 2 passes → 240 s of cutting; 3 pieces × 2 passes × 0.5 s → 3 s.
    expect(MOVE_ALLOWANCE_S).toBe(0.5)
    expect(estimateCutSeconds({ cutLengthMm: 1200, pieces: 3, speedMmS: 10, passes: 2 })).toBe(243)
  })

  it('counts a layer\'s registration marks with each copy: their length and their outlines', () => {
    // Worked by hand: 500 mm in 3 pieces and 1 hole, with 108 mm of marks in 6 outlines → 608 mm, 10 outlines.
    expect(cutPerCopy({ cutLengthMm: 500, pieces: 3, holes: 1 }, { cutLengthMm: 108, outlines: 6 })).toEqual({ cutLengthMm: 608, outlines: 10 })
    expect(cutPerCopy({ cutLengthMm: 500, pieces: 3, holes: 1 })).toEqual({ cutLengthMm: 500, outlines: 4 })
  })

  it('refuses a speed of zero', () => {
    expect(() => estimateCutSeconds({ cutLengthMm: 1, pieces: 1, speedMmS: 0, passes: 1 })).toThrow(RangeError)
  })

  it('reads as people say it', () => {
    expect(formatDuration(42)).toBe('42 s')
    expect(formatDuration(243)).toBe('4 min 03 s')
    expect(formatDuration(3 * 3600 + 5 * 60)).toBe('3 h 05 min')
  })
})
