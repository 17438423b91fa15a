// Sheets of film against the cut queue: how many sheets each queued job needs (the sheet
// layout with the cut sheet's default gap and margin), and whether the shelf still covers it
// once the jobs queued before it in the same film have taken theirs.
import { CUT_SHEET_LIMITS } from '../constants/cut-sheet'
import { layoutSheets } from '../utils/sheet-layout'
import type { JobStock } from '../types/robots'

export interface QueuedJobSheets {
  id: number
  filmId: number
  copies: number
  copyWidthMm: number
  copyHeightMm: number
  sheetWidthMm: number
  sheetHeightMm: number
}

/** Sheets a job needs with the cut sheet's default gap and margin; 0 when a copy does not fit on the sheet at all. */
export function sheetsNeeded(j: Omit<QueuedJobSheets, 'id' | 'filmId'>): number {
  const l = layoutSheets({
    copyWidthMm: j.copyWidthMm, copyHeightMm: j.copyHeightMm, copies: j.copies, sheetWidthMm: j.sheetWidthMm, sheetHeightMm: j.sheetHeightMm,
    gapMm: CUT_SHEET_LIMITS.gap.default, marginMm: CUT_SHEET_LIMITS.margin.default,
  })
  return l.fits ? l.sheets : 0
}

/**
 * Each queued job's sheets against the shelf, in queue order (first queued, first cut): the
 * jobs before it in the same film take their sheets first.
 */
export function forecastSheets(jobs: readonly QueuedJobSheets[], onHand: ReadonlyMap<number, number>): Map<number, JobStock> {
  const taken = new Map<number, number>()
  const out = new Map<number, JobStock>()
  for (const j of jobs) {
    const need = sheetsNeeded(j)
    const ahead = taken.get(j.filmId) ?? 0
    const have = onHand.get(j.filmId) ?? 0
    out.set(j.id, { sheetsNeeded: need, neededAhead: ahead, onHand: have, enough: ahead + need <= have })
    taken.set(j.filmId, ahead + need)
  }
  return out
}

/** The queue's warning for one job, in words, or null when the shelf covers it. */
export function stockWarning(s: JobStock): string | null {
  if (s.enough) return null
  const left = Math.max(0, s.onHand - s.neededAhead)
  const sheets = (n: number) => `${n} sheet${n === 1 ? '' : 's'}`
  return s.neededAhead > 0
    ? `Runs out: needs ${sheets(s.sheetsNeeded)}, and ${sheets(left)} of ${s.onHand} on hand are left after the jobs queued before it.`
    : `Runs out: needs ${sheets(s.sheetsNeeded)}, ${sheets(s.onHand)} on hand.`
}
