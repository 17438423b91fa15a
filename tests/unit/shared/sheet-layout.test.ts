// Sheet layout against counts worked out by hand (the working is in each test's comments).
// Rule being checked, per side: n = floor((L − 2·margin + gap) / (c + gap)).
import { describe, expect, it } from 'vitest'
import { copiesAlong, layoutSheets, type SheetLayoutInput } from '../../../shared/utils/sheet-layout'

const base: SheetLayoutInput = {
  copyWidthMm: 50, copyHeightMm: 30, copies: 1, sheetWidthMm: 300, sheetHeightMm: 200, gapMm: 5, marginMm: 10, allowTurn: true,
}

describe('layoutSheets: copies per sheet, worked by hand', () => {
  it('50 × 30 on 300 × 200, gap 5, margin 10: 25 as drawn beats 24 turned', () => {
    // As drawn: across (300 − 20 + 5) / (50 + 5) = 285 / 55 = 5.18 → 5 columns
    //           down   (200 − 20 + 5) / (30 + 5) = 185 / 35 = 5.29 → 5 rows → 25 per sheet.
    // Turned 30 × 50: across 285 / 35 = 8.14 → 8, down 185 / 55 = 3.36 → 3 → 24. Keep as drawn.
    const l = layoutSheets({ ...base, copies: 25 })
    expect(l).toMatchObject({ fits: true, perSheet: 25, columns: 5, rows: 5, turned: false, sheets: 1 })
    // Usage: 25 × 50 × 30 = 37 500 mm² of 300 × 200 = 60 000 mm² → 62.5 %.
    expect(l.usagePercent).toBeCloseTo(62.5, 10)
    // Last copy (25th): row 4, column 4 → x = 10 + 4 × 55 = 230, y = 10 + 4 × 35 = 150.
    expect(l.placements[24]).toEqual({ sheet: 1, x: 230, y: 150, turned: false })
    // Its right edge 230 + 50 = 280 = 300 − 20 margin: the fifth column just fits.
  })

  it('90 × 40 on 200 × 300, gap 5, margin 10: turning doubles the count', () => {
    // As drawn: across (200 − 20 + 5) / 95 = 185 / 95 = 1.95 → 1; down (300 − 20 + 5) / 45 = 285 / 45 = 6.33 → 6 → 6.
    // Turned 40 × 90: across 185 / 45 = 4.11 → 4; down 285 / 95 = 3 exactly → 3 → 12.
    const input = { ...base, copyWidthMm: 90, copyHeightMm: 40, sheetWidthMm: 200, sheetHeightMm: 300, copies: 12 }
    const l = layoutSheets(input)
    expect(l).toMatchObject({ fits: true, perSheet: 12, columns: 4, rows: 3, turned: true, sheets: 1, placedWidthMm: 40, placedHeightMm: 90 })
    expect(l.placements.every((p) => p.turned)).toBe(true)
    // Without turning: 6 per sheet, so 12 copies need 2 sheets.
    const still = layoutSheets({ ...input, allowTurn: false })
    expect(still).toMatchObject({ perSheet: 6, columns: 1, rows: 6, turned: false, sheets: 2 })
  })

  it('a tie keeps the copy as drawn (70 × 40 on 200 × 300: 12 either way)', () => {
    // As drawn: across 185 / 75 = 2.47 → 2; down 285 / 45 = 6.33 → 6 → 12.
    // Turned 40 × 70: across 185 / 45 = 4.11 → 4; down 285 / 75 = 3.8 → 3 → 12. Tie → as drawn.
    const l = layoutSheets({ ...base, copyWidthMm: 70, copyHeightMm: 40, sheetWidthMm: 200, sheetHeightMm: 300, copies: 3 })
    expect(l).toMatchObject({ perSheet: 12, columns: 2, rows: 6, turned: false })
    // A square copy is a tie by definition.
    expect(layoutSheets({ ...base, copyWidthMm: 30, copyHeightMm: 30 }).turned).toBe(false)
  })

  it('several sheets, filled sheet by sheet and row by row (90 × 40 turned, 30 copies)', () => {
    // 12 per sheet (above) → 30 copies need ceil(30 / 12) = 3 sheets: 12 + 12 + 6.
    const l = layoutSheets({ ...base, copyWidthMm: 90, copyHeightMm: 40, sheetWidthMm: 200, sheetHeightMm: 300, copies: 30 })
    expect(l.sheets).toBe(3)
    expect(l.placements).toHaveLength(30)
    expect(l.placements.filter((p) => p.sheet === 3)).toHaveLength(6)
    // Copy 13 (index 12) starts sheet 2 at the top-left margin corner.
    expect(l.placements[12]).toEqual({ sheet: 2, x: 10, y: 10, turned: true })
    // Copy 18 (index 17) is the 6th on sheet 2: row 1, column 1 → x = 10 + 45, y = 10 + 95.
    expect(l.placements[17]).toEqual({ sheet: 2, x: 55, y: 105, turned: true })
    // Copy 4 (index 3): row 0, column 3 → x = 10 + 3 × 45 = 145; right edge 145 + 40 = 185 ≤ 190.
    expect(l.placements[3]).toEqual({ sheet: 1, x: 145, y: 10, turned: true })
    // Usage: 30 × 90 × 40 = 108 000 mm² of 3 × 200 × 300 = 180 000 mm² → 60 %.
    expect(l.usagePercent).toBeCloseTo(60, 10)
  })

  it('exactly fits: n·c + (n − 1)·g = L − 2m counts n, and 0.01 mm more counts n − 1', () => {
    // 41.25 square on 200 × 200, gap 5, margin 10: 4 × 41.25 + 3 × 5 = 165 + 15 = 180 = 200 − 20.
    // (200 − 20 + 5) / (41.25 + 5) = 185 / 46.25 = 4 exactly → 4 × 4 = 16.
    const exact = { ...base, copyWidthMm: 41.25, copyHeightMm: 41.25, sheetWidthMm: 200, sheetHeightMm: 200 }
    expect(layoutSheets(exact)).toMatchObject({ perSheet: 16, columns: 4, rows: 4 })
    // 41.26: 185 / 46.26 = 3.999 → 3 × 3 = 9.
    expect(layoutSheets({ ...exact, copyWidthMm: 41.26, copyHeightMm: 41.26 })).toMatchObject({ perSheet: 9, columns: 3, rows: 3 })
    // One copy exactly the usable width: 180 on 200 with margin 10 → (180 + 5) / 185 = 1.
    expect(copiesAlong(200, 180, 5, 10)).toBe(1)
    expect(copiesAlong(200, 180.01, 5, 10)).toBe(0)
  })

  it('exactly fits with decimals that binary floating point cannot hold (29.8 + 0.3 gaps on 100, margin 5)', () => {
    // 3 × 29.8 + 2 × 0.3 = 89.4 + 0.6 = 90 = 100 − 2 × 5, so 3 fit on paper.
    // Plain floating point: (100 − 10 + 0.3) / (29.8 + 0.3) = 2.9999999999999996, floor → 2.
    expect(Math.floor((100 - 10 + 0.3) / (29.8 + 0.3))).toBe(2)
    expect(copiesAlong(100, 29.8, 0.3, 5)).toBe(3)
  })

  it('no gap, no margin: 25 × 25 on 100 × 100 → 4 × 4 = 16, usage 100 %', () => {
    const l = layoutSheets({ ...base, copyWidthMm: 25, copyHeightMm: 25, sheetWidthMm: 100, sheetHeightMm: 100, gapMm: 0, marginMm: 0, copies: 16 })
    expect(l).toMatchObject({ perSheet: 16, sheets: 1 })
    expect(l.usagePercent).toBeCloseTo(100, 10)
    expect(l.placements[15]).toEqual({ sheet: 1, x: 75, y: 75, turned: false })
  })

  it('a copy that never fits: fits false, perSheet 0, a reason', () => {
    // 250 × 80 on 200 × 200, margin 10: usable 180 × 180; as drawn 250 > 180, turned 250 > 180.
    const l = layoutSheets({ ...base, copyWidthMm: 250, copyHeightMm: 80, sheetWidthMm: 200, sheetHeightMm: 200, copies: 3 })
    expect(l).toMatchObject({ fits: false, perSheet: 0, sheets: 0, placements: [], usagePercent: 0 })
    expect(l.reason).toMatch(/250 × 80 mm does not fit .*200 × 200 mm.*180 × 180 mm.*not even turned/)
  })

  it('a copy that fits only turned, with turning off: fits false, and the reason says so', () => {
    // 80 × 250 on 300 × 200, gap 5, margin 10 (usable 280 × 180).
    // As drawn: across 285 / 85 = 3.35 → 3, down 185 / 255 = 0.73 → 0 → 0 per sheet.
    // Turned 250 × 80: across 285 / 255 = 1.12 → 1, down 185 / 85 = 2.18 → 2 → 2 per sheet.
    const input = { ...base, copyWidthMm: 80, copyHeightMm: 250, copies: 1 }
    expect(layoutSheets(input)).toMatchObject({ fits: true, turned: true, perSheet: 2, columns: 1, rows: 2 })
    const off = layoutSheets({ ...input, allowTurn: false })
    expect(off).toMatchObject({ fits: false, perSheet: 0 })
    expect(off.reason).toMatch(/would fit turned 90°, but turning is off/)
  })

  it('with a weeding frame, gap and margin are kept between frames (50 × 30, frame 2)', () => {
    // Frame 2 mm: boxes 9 apart (gap 5 + 2 × 2) and 12 from the edges (margin 10 + 2) — the
    // same as a 54 × 34 framed box with gap 5 and margin 10.
    // As drawn: across (300 − 24 + 9) / (50 + 9) = 285 / 59 = 4.83 → 4, down (200 − 24 + 9) / (30 + 9)
    //           = 185 / 39 = 4.74 → 4 → 16.
    // Turned 30 × 50: across 285 / 39 = 7.31 → 7, down 185 / 59 = 3.14 → 3 → 21. Turned wins.
    const l = layoutSheets({ ...base, copies: 21, weedingFrameMm: 2 })
    expect(l).toMatchObject({ perSheet: 21, columns: 7, rows: 3, turned: true, sheets: 1 })
    // Copy 1's box at (12, 12), so its frame starts at the 10 mm margin; copy 2 at
    // x = 12 + 30 + 9 = 51: its frame starts at 49, 5 mm (the gap) after copy 1's frame ends at 44.
    expect(l.placements[0]).toEqual({ sheet: 1, x: 12, y: 12, turned: true })
    expect(l.placements[1]).toEqual({ sheet: 1, x: 51, y: 12, turned: true })
    // Usage counts the copies' boxes, not the frames: 21 × 1500 / 60 000 → 52.5 %.
    expect(l.usagePercent).toBeCloseTo(52.5, 10)
    // Frame 0 or null is no frame.
    expect(layoutSheets({ ...base, weedingFrameMm: 0 }).perSheet).toBe(25)
    expect(layoutSheets({ ...base, weedingFrameMm: null }).perSheet).toBe(25)
    expect(() => layoutSheets({ ...base, weedingFrameMm: -1 })).toThrow(RangeError)
    expect(layoutSheets({ ...base, copyWidthMm: 280, copyHeightMm: 180, weedingFrameMm: 1 }).reason).toMatch(/with its 1 mm weeding frame/)
  })

  it('margins wider than the sheet leave nothing', () => {
    expect(copiesAlong(100, 10, 5, 60)).toBe(0)
    expect(layoutSheets({ ...base, marginMm: 160 }).fits).toBe(false)
  })
})

describe('layoutSheets: input checks', () => {
  it.each([
    ['copyWidthMm', 0], ['copyWidthMm', -3], ['copyHeightMm', Number.NaN], ['sheetWidthMm', Number.POSITIVE_INFINITY],
    ['sheetHeightMm', 0], ['gapMm', -1], ['marginMm', -0.5], ['copies', 0], ['copies', 2.5], ['copies', -1],
    ['copies', 10_001],
  ] as const)('%s = %s is refused with a RangeError', (field, value) => {
    expect(() => layoutSheets({ ...base, [field]: value })).toThrow(RangeError)
  })

  it('says what is wrong', () => {
    expect(() => layoutSheets({ ...base, copies: 1.5 })).toThrow(/whole number of at least 1/)
    expect(() => layoutSheets({ ...base, copyWidthMm: -2 })).toThrow(/copy width must be a positive number/)
    expect(() => layoutSheets({ ...base, gapMm: -2 })).toThrow(/gap must be zero or a positive/)
  })

  it('zero gap and zero margin are allowed', () => {
    expect(layoutSheets({ ...base, gapMm: 0, marginMm: 0 }).fits).toBe(true)
  })
})
