import type { CleanUpChoice, EngineVersions, Measurements, StageTimings } from './pipeline'
import type { Can } from './policy'
import type { PlateFacts, RevisionOrigin } from './plates'
import type { JobKind, JobState } from './robots'
import type { RevisionColour, RevisionLayerInfo } from './layers'

export const ARTWORK_STATUSES = ['draft', 'in-review', 'approved', 'sent-back'] as const
export type ArtworkStatus = (typeof ARTWORK_STATUSES)[number]
export const ARTWORK_STATUS_LABELS: Record<ArtworkStatus, string> = {
  'draft': 'Draft', 'in-review': 'In review', 'approved': 'Approved', 'sent-back': 'Sent back',
}

export interface RevisionSummary {
  id: number
  number: number
  status: ArtworkStatus
  /** The decal's size: the drawing's ink, with the margin (if any) on every side. */
  widthMm: number
  heightMm: number
  /** The drawing's width asked for (its ink, from leftmost to rightmost), mm. */
  drawingWidthMm: number
  createdAt: string
  author: string
  /** For a layered revision, the totals of its layers (summed area, cut length, pieces…; the narrowest stroke of any; the framed canvas). */
  measurements: Measurements
  /** 1 for one colour; 2–6 for a layered revision. */
  layerCount: number
  /** A layered revision's layers, bottom first; empty for one colour. */
  layers: RevisionLayerInfo[]
  /** What the separation found and how the layers stack; null for one colour. */
  colour: RevisionColour | null
}

export interface ReviewEntry {
  id: number
  action: 'submit' | 'approve' | 'send-back'
  comment: string
  at: string
  by: string
}

export interface RevisionDetail extends RevisionSummary {
  artworkId: number
  reviews: ReviewEntry[]
  settings: Record<string, unknown>
  /** What the clean-up chose for this revision (or was told), and why: one line per choice. */
  choices: CleanUpChoice[]
  timings: StageTimings
  engineVersions: EngineVersions
  /** traced: from the source through the pipeline; generated: an exact vector from the plate generator. */
  origin: RevisionOrigin
  /** For a generated plate: what was asked and what its vector measured. */
  plate: PlateFacts | null
  /** Null for a generated revision, which has no source, prepared bitmap or raw outline. */
  source: SourceInfo | null
  files: { vector: string; prepared: string | null; outline: string | null; source: string | null }
}

export interface SourceInfo {
  id: number
  mediaType: string
  fileName: string
  widthPx: number
  heightPx: number
  bytes: number
  contentHash: string
}

export interface ArtworkListItem {
  id: number
  title: string
  status: ArtworkStatus
  team: { id: number; name: string; colour: string }
  author: string
  /** The newest revision, with its own status (the artwork's is that of its latest decision). */
  latestRevision: { id: number; number: number; status: ArtworkStatus } | null
  revisionCount: number
  updatedAt: string
}

/** One page of the artwork list, with how many match in all. */
export interface ArtworkPage {
  items: ArtworkListItem[]
  total: number
  nextCursor: string | null
}

/** One place the artwork's decal is (or will be): a placement of one of its revisions, with its jobs. */
export interface ArtworkPlacement {
  id: number
  spot: string
  widthMm: number
  quantity: number
  spares: number
  sparesOnHand: number
  revisionNumber: number
  robot: { id: number; name: string; season: string }
  film: { id: number; name: string }
  jobs: { id: number; kind: JobKind; state: JobState; quantity: number }[]
}

/** The latest mentor's decision on any revision of an artwork. */
export interface ArtworkDecision {
  decision: 'approve' | 'send-back'
  comment: string
  at: string
  by: string
  revisionNumber: number
}

export interface ArtworkDetail {
  artwork: ArtworkListItem & { createdAt: string }
  revisions: RevisionSummary[]
  /** Every robot, spot, film and job the artwork's decals are placed on. */
  placements: ArtworkPlacement[]
  lastDecision: ArtworkDecision | null
  /** What the viewer may do here. */
  can: Can<'artwork.revise' | 'revision.submit' | 'revision.review'>
}

export interface CreatedArtwork {
  artwork: ArtworkListItem
  revision: RevisionDetail
}

export interface Preview {
  /** The clean vector (SVG text, in mm). */
  svg: string
  /** The prepared bitmap as a data: URL (PNG). */
  preparedPng: string
  histogram: number[]
  /**
   * Measured on the preview's own coarser bitmap (measurements.pxPerMm): estimates of what
   * the saved revision, at its full resolution, will measure.
   */
  measurements: Measurements
  timings: StageTimings
  /** The clean-up's choices for these settings, and why (as a saved revision would record them). */
  choices: CleanUpChoice[]
  /** Asked with colour settings: the inks the look found (what merges, drops and order refer to) and the layers they make; null when asked for none. */
  colour?: PreviewColour | null
}

export interface PreviewColour {
  /** The inks found, lightest first; tooSmall ones are left out unless merged into another. */
  found: { name: string; hex: string; share: number; tooSmall: boolean }[]
  /** The layers, bottom first, as a revision would make them; empty when the settings make one colour. */
  layers: { name: string; hex: string }[]
  /** Every layer in its colour, on the framed canvas (mm); null for one colour. */
  stackedSvg: string | null
  sentence: string
}

export interface ReviewQueueItem {
  revisionId: number
  number: number
  artworkId: number
  title: string
  author: string
  team: { id: number; name: string; colour: string }
  widthMm: number
  heightMm: number
  submittedAt: string
  vectorUrl: string
  measurements: Measurements
  /** 1 for one colour; 2–6 for a layered revision (its layers are in the revision's answer). */
  layerCount: number
  /** How many revisions of the artwork were made after this one, and the newest one's number. */
  newerRevisions: number
  latestNumber: number
}
