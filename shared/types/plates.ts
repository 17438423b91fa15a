// API shapes of number plates: rule profiles, the plate generator and the robot check.
import type { PlateColour, RobotSide, RuleProfile } from '../plates/profiles'
import type { RuleResult } from '../plates/check'
import type { Can } from './policy'

export const REVISION_ORIGINS = ['traced', 'generated'] as const
/** traced: from a source picture through the pipeline; generated: an exact vector from the plate generator. */
export type RevisionOrigin = (typeof REVISION_ORIGINS)[number]

export type PlateLayerRole = 'background' | 'numerals'

/** What was measured on one layer's clean vector (server/plates/measure.ts), mm. */
export interface PlateLayerFigures {
  /** Height of the tallest piece of ink: for the numerals, the numeral height. */
  tallestPieceMm: number | null
  /** Least distance from the ink to the vector's edge. */
  marginMm: number | null
  /** Narrowest stroke (the pipeline's narrowest-feature definition). */
  strokeMm: number | null
  /** Resolution the stroke was measured at, px/mm. */
  strokePxPerMm: number
  /** The plate's own size, mm, when the vector is larger (a layered plate's canvas holds its registration marks). */
  plateWidthMm?: number
  plateHeightMm?: number
}

/** Recorded on a generated revision: what the generator was asked, and what its vector measured. */
export interface PlateFacts {
  /** Shared by the layers of one plate, so the check can pair background and numerals. */
  group: string
  /** The numerals' layer for a layered plate (its figures are the numerals'). */
  role: PlateLayerRole
  /** A layered plate's layers, bottom first: which revision layer is which (absent on the older one-artwork-per-colour plates). */
  layers?: { position: number; role: PlateLayerRole; colour: PlateColour }[]
  colour: PlateColour
  teamNumber: string
  profile: { id: number; name: string; key: string }
  font: { id: string; family: string; style: string; licence: string }
  /** The numeral height asked of the generator, mm. */
  numeralHeightMm: number
  marginMm: number
  cornerRadiusMm: number
  measured: PlateLayerFigures
}

export interface RuleProfileView {
  id: number
  name: string
  /** Set when the profile follows a shipped preset: it cannot be edited, only copied. */
  presetKey: string | null
  /** The preset key or profile name a copy was made from. */
  copiedFrom: string | null
  editable: boolean
  profile: RuleProfile
}

export interface PlateFontChoice { id: string; label: string; licence: string }

export interface RuleProfilesPage {
  presets: RuleProfile[]
  profiles: RuleProfileView[]
  /** The profile that applies to every team of the program. */
  chosenId: number | null
  fonts: PlateFontChoice[]
  can: Can<'program.manage'>
}

export interface PlatePreviewLayer {
  role: PlateLayerRole
  colour: PlateColour
  /** The layer's clean vector (width, height and viewBox in mm). */
  svg: string
}

export interface PlatePreview {
  teamNumber: string
  profileId: number
  widthMm: number
  heightMm: number
  numeralHeightMm: number
  marginMm: number
  /** The plate is larger than the profile's smallest: the numerals needed the room. */
  grown: boolean
  font: PlateFontChoice
  /** Bottom to top, in register. */
  layers: PlatePreviewLayer[]
}

export interface CreatedPlate {
  group: string
  /** One layered artwork: its layers bottom first. */
  artworks: { artworkId: number; revisionId: number; title: string; layers: { role: PlateLayerRole; colour: PlateColour }[] }[]
}

/** A robot checked against its program's rule profile. */
export interface RobotPlateCheck {
  profile: { id: number; name: string; competition: string; season: string; manual: string; notice: string } | null
  results: RuleResult[]
  /** Plate placements (numerals layers with a side) found on the robot. */
  plates: { placementId: number; side: RobotSide; title: string; numeralHeightMm: number | null; strokeMm: number | null; numeralColour: string | null; backgroundColour: string | null }[]
  /** Placements the event kit would reprint: every plate layer and every decal marked as needed at events. */
  kitPlacements: number
  can: Can<'placement.reprint'>
}

/** What the event kit queued: one reprint job per placement, in one batch per film. */
export interface EventKit {
  jobIds: number[]
  /** Copies queued in all. */
  copies: number
  batches: { id: number; filmId: number; filmName: string; jobIds: number[]; copies: number }[]
}
