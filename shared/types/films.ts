import type { Halogen, PolymerSource, PolymerVerdict } from '../films/polymers'
import type { Opacity } from '../films/library'
import type { Can } from './policy'

/** A register entry as the API shows it. */
export interface PolymerView {
  code: string
  name: string
  names: string[]
  halogens: Halogen[]
  chlorineFree: boolean
  verdict: PolymerVerdict
  why: string
  sources: PolymerSource[]
}

/** How a power and speed range was laid out on a test grid. */
export interface SettingRangeRecord { from: number; to: number; steps: number }
export interface TestGridRecord { power: SettingRangeRecord; speed: SettingRangeRecord; passes: number; squareMm: number }

export interface FilmTest {
  id: number
  at: string
  by: string
  grid: TestGridRecord
  /** The square that weeded cleanly ("C4"), or null when none did. */
  square: string | null
  result: 'clean' | 'none-clean'
  powerPct: number | null
  speedMmS: number | null
  passes: number
  kerfMm: number | null
  note: string
}

export type StockEventKind = 'delivery' | 'count' | 'cut' | 'failed-cut'

export interface StockEvent {
  id: number
  at: string
  by: string
  kind: StockEventKind
  change: number
  onHand: number
  jobId: number | null
  note: string
}

export interface Film {
  id: number
  name: string
  polymer: PolymerView
  /** Derived from the polymer and the lab's approval, never declared. */
  chlorineFree: boolean
  /** Whether the database lets placements and jobs use this film: allowed, or ask-the-lab with the lab's approval. */
  cleared: boolean
  labApproval: { by: string; at: string; safetyDataSheet: string } | null
  colour: string
  colourHex: string
  opacity: Opacity
  thicknessMm: number
  sheetWidthMm: number
  sheetHeightMm: number
  minFeatureMm: number
  /** The kerf to allow for: measured, or the common-practice default. */
  kerfMm: number
  kerfMeasured: boolean
  laserPowerPct: number
  laserSpeedMmS: number
  laserPasses: number
  /** The latest test cut on this program's laser, if any. */
  lastTest: FilmTest | null
  /** The blue-beam caution while the film is untested, or null. */
  beamCaution: string | null
  sheetsOnHand: number
  retired: boolean
  retiredReason: string | null
  /** Whether the film may be placed and cut now: cleared and not retired. */
  usable: boolean
  /** Why it cannot be used, in a sentence, when it cannot. */
  notUsableBecause: string | null
}

export interface FilmDetail extends Film {
  tests: FilmTest[]
  stock: StockEvent[]
  /** Placements and jobs on this film: a film in use keeps its polymer. */
  inUse: boolean
  can: Can<'film.manage' | 'film.test'>
}

/** A test grid's layout for the page's table: which square is cut at what. */
export interface TestGridPlan {
  widthMm: number
  heightMm: number
  rows: { letter: string; powerPercent: number }[]
  columns: { number: number; speedMmS: number }[]
  passes: number
}
