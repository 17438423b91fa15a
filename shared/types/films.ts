export interface Film {
  id: number
  name: string
  basePolymer: string
  chlorineFree: boolean
  colour: string
  thicknessMm: number
  sheetWidthMm: number
  sheetHeightMm: number
  minFeatureMm: number
  laserPowerPct: number
  laserSpeedMmS: number
  laserPasses: number
  retired: boolean
  /** Whether the film may be placed and cut; false for anything not chlorine-free or retired. */
  usable: boolean
  /** Why it cannot be used, in a sentence, when it cannot. */
  notUsableBecause: string | null
}
