import type { AuditAction } from './audit'
import type { Film } from './films'
import type { Can } from './policy'
import type { RobotSide } from '../plates/profiles'

export const JOB_STATES = ['queued', 'cut', 'applied', 'cancelled', 'failed'] as const
export type JobState = (typeof JOB_STATES)[number]
export const JOB_STATE_LABELS: Record<JobState, string> = { queued: 'Queued', cut: 'Cut', applied: 'Applied', cancelled: 'Cancelled', failed: 'Failed' }

/** initial: a placement's first cut; reprint: asked for by the team; recut: after a failed cut; extra: copies a placement's edit added. */
export const JOB_KINDS = ['initial', 'reprint', 'recut', 'extra'] as const
export type JobKind = (typeof JOB_KINDS)[number]
export const JOB_KIND_LABELS: Record<JobKind, string> = { initial: 'First cut', reprint: 'Reprint', recut: 'Recut', extra: 'More copies' }

export const CUT_FAILURES = ['burnt', 'lifted', 'mis-weeded', 'other'] as const
export type CutFailure = (typeof CUT_FAILURES)[number]
export const CUT_FAILURE_LABELS: Record<CutFailure, string> = { 'burnt': 'Burnt', 'lifted': 'Lifted from the liner', 'mis-weeded': 'Mis-weeded', 'other': 'Something else' }

/** What a job's card needs about its film's stock in the queue: the sheets it needs against those on hand after the queued jobs before it. */
export interface JobStock {
  sheetsNeeded: number
  /** Sheets the queued jobs ahead of this one in the same film need. */
  neededAhead: number
  onHand: number
  /** Whether the sheets on hand cover this job after the ones ahead of it. */
  enough: boolean
}

export interface PlacementView {
  id: number
  spot: string
  /** Which side of the robot; null when not recorded. */
  side: RobotSide | null
  widthMm: number
  heightMm: number
  quantity: number
  spares: number
  /** Cut copies not on the robot: cutting adds, applying takes. */
  sparesOnHand: number
  /** Its spares go in the robot's event kit. */
  neededAtEvents: boolean
  /** The bottom layer's film for a layered decal. */
  film: { id: number; name: string; colour: string; colourHex: string }
  /** A layered decal's layers, bottom first, each with the film it is cut in; empty for one colour. */
  layers: PlacedLayer[]
  revision: { id: number; number: number; artworkId: number; title: string; vectorUrl: string }
  createdAt: string
  createdBy: string
  /** layer: the layer a job cuts (null for one colour); orderId groups one order's jobs. */
  jobs: { id: number; kind: JobKind; quantity: number; state: JobState; widthMm: number; layer: number | null; orderId: number | null }[]
}

/** One layer of a layered placement and its film. */
export interface PlacedLayer {
  position: number
  name: string
  hex: string
  film: { id: number; name: string; colour: string; colourHex: string }
}

/** A layer of an approved layered revision, with the cleared films nearest its ink's colour first. */
export interface RevisionLayerChoice {
  position: number
  name: string
  hex: string
  /** Cleared, unretired films, nearest in colour first (CIEDE2000 between the ink and the film's swatch). */
  suggestedFilmIds: number[]
}

export interface RobotView {
  id: number
  name: string
  season: string
  team: { id: number; name: string; colour: string }
  placements: PlacementView[]
  /** What the viewer may do here; 'queue.work' opens the jobs' pages. */
  can: Can<'placement.create' | 'placement.edit' | 'placement.reprint' | 'robot.edit' | 'queue.work'>
}

/** An approved revision that may go on a robot of its team. */
export interface ApprovedRevision {
  revisionId: number
  artworkId: number
  title: string
  number: number
  widthMm: number
  heightMm: number
  /** The revision's narrowest stroke at its own width, mm. */
  narrowestMm: number | null
  /** Bottom first; empty for a one-colour revision. */
  layers: RevisionLayerChoice[]
}

export interface JobView {
  id: number
  kind: JobKind
  quantity: number
  reason: string
  state: JobState
  createdAt: string
  createdBy: string
  cutAt: string | null
  cutBy: string | null
  sheetsUsed: number | null
  appliedAt: string | null
  appliedBy: string | null
  appliedCount: number | null
  cancelledAt: string | null
  cancelledBy: string | null
  cancelReason: string | null
  failedAt: string | null
  failedBy: string | null
  failure: CutFailure | null
  failureNote: string | null
  recutOf: number | null
  /** The job that recut this one after it failed. */
  recutBy: number | null
  /** The copies' size as this job cuts them (fixed when it was queued). */
  placement: { id: number; spot: string; widthMm: number; heightMm: number; quantity: number; sparesOnHand: number; removed: boolean }
  robot: { id: number; name: string; season: string }
  team: { id: number; name: string; colour: string }
  revision: { id: number; number: number; artworkId: number; title: string; vectorUrl: string }
  /**
   * The layer this job cuts, for a layered decal ("layer 2 of 3: red"), with the order's jobs
   * (this one among them), one per layer; null for one colour.
   */
  layer: JobLayer | null
  film: Film
  /** For queued jobs: sheets needed against sheets on hand. */
  stock: JobStock | null
  /** The batch it is cut in, if any. */
  batchId: number | null
}

/** One copy on a cut sheet: its label (job-copy), its job, which sheet, and its box there (mm, y down). */
export interface SheetCopy { label: string; jobId: number; sheet: number; turned: boolean; box: { x: number; y: number; width: number; height: number } }

/** How the copies of a job or batch go on the film's sheets. */
export interface JobLayout {
  fits: boolean
  reason?: string
  method: 'grid' | 'packer'
  sheets: number
  /** Copies on the first sheet. */
  perSheet: number
  turned: boolean
  usagePercent: number
  /** The kerf the cut path is compensated by, mm (0: none). */
  kerfMm: number
  copies: SheetCopy[]
}

export interface JobDetail extends JobView {
  layout: JobLayout
  cutLengthMm: number
  pieces: number
  estimate: { seconds: number; text: string; how: string }
  history: { at: string; action: AuditAction; by: string | null; detail: Record<string, unknown> }[]
  can: Can<'queue.work'>
}

export type BatchState = 'queued' | 'cut'

/** Queued jobs in one film, cut together on shared sheets. */
export interface BatchDetail {
  id: number
  state: BatchState
  createdAt: string
  createdBy: string
  cutAt: string | null
  cutBy: string | null
  sheetsUsed: number | null
  film: Film
  jobs: JobView[]
  copies: number
  layout: JobLayout
  cutLengthMm: number
  estimate: { seconds: number; text: string; how: string }
  can: Can<'queue.work'>
}

/** Queued jobs that could share sheets: the same film, none in a batch yet. */
export interface BatchSuggestion { filmId: number; filmName: string; jobIds: number[]; copies: number }

export interface BatchSummary { id: number; filmId: number; filmName: string; state: BatchState; jobIds: number[]; copies: number; createdAt: string }

export interface BatchList { batches: BatchSummary[]; suggestions: BatchSuggestion[] }

/** Which layer of a layered decal a job cuts, and its order's jobs. */
export interface JobLayer {
  /** From 0, bottom first. */
  position: number
  count: number
  name: string
  hex: string
  orderId: number
  order: { id: number; layer: number; name: string; filmName: string; state: JobState }[]
  /** Every layer of the decal, bottom first, with its clean vector as cut (marks included), for the order of application. */
  layers: { position: number; name: string; hex: string; vectorUrl: string }[]
}
