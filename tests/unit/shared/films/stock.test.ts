import { describe, expect, it } from 'vitest'
import { forecastSheets, sheetsNeeded, stockWarning } from '../../../../shared/films/stock'

// Layouts worked by hand with the cut sheet's defaults (gap 3 mm, margin 5 mm):
// 50 × 33.3 mm copies on a 300 × 200 mm sheet: floor((300 − 10 + 3) / 53) = 5 across,
// floor((200 − 10 + 3) / 36.3) = 5 down, 25 per sheet (turned: 3 × 7 = 21, fewer).
const copy = { copyWidthMm: 50, copyHeightMm: 100 / 3, sheetWidthMm: 300, sheetHeightMm: 200 }

describe('sheets against the shelf', () => {
  it('counts the sheets a job needs', () => {
    expect(sheetsNeeded({ ...copy, copies: 25 })).toBe(1)
    expect(sheetsNeeded({ ...copy, copies: 26 })).toBe(2)
    expect(sheetsNeeded({ ...copy, copies: 60 })).toBe(3)
    expect(sheetsNeeded({ ...copy, copyWidthMm: 400, copies: 1 })).toBe(0)
  })

  it('gives the shelf to the jobs in queue order, film by film, and warns the first that runs out', () => {
    const jobs = [
      { id: 1, filmId: 7, copies: 30, ...copy }, // 2 sheets
      { id: 2, filmId: 8, copies: 5, ...copy }, // 1 sheet of another film
      { id: 3, filmId: 7, copies: 25, ...copy }, // 1 sheet
      { id: 4, filmId: 7, copies: 1, ...copy }, // 1 sheet: the fourth of film 7
    ]
    const f = forecastSheets(jobs, new Map([[7, 3], [8, 0]]))
    expect(f.get(1)).toEqual({ sheetsNeeded: 2, neededAhead: 0, onHand: 3, enough: true })
    expect(f.get(2)).toEqual({ sheetsNeeded: 1, neededAhead: 0, onHand: 0, enough: false })
    expect(f.get(3)).toEqual({ sheetsNeeded: 1, neededAhead: 2, onHand: 3, enough: true })
    expect(f.get(4)).toEqual({ sheetsNeeded: 1, neededAhead: 3, onHand: 3, enough: false })
    expect(stockWarning(f.get(1)!)).toBeNull()
    expect(stockWarning(f.get(2)!)).toBe('Runs out: needs 1 sheet, 0 sheets on hand.')
    expect(stockWarning(f.get(4)!)).toBe('Runs out: needs 1 sheet, and 0 sheets of 3 on hand are left after the jobs queued before it.')
  })
})
