import type { AuditAction } from './audit'
import type { Film } from './films'
import type { Can } from './policy'

export const JOB_STATES = ['queued', 'cut', 'applied'] as const
export type JobState = (typeof JOB_STATES)[number]
export const JOB_STATE_LABELS: Record<JobState, string> = { queued: 'Queued', cut: 'Cut', applied: 'Applied' }

export interface PlacementView {
  id: number
  spot: string
  widthMm: number
  heightMm: number
  quantity: number
  spares: number
  film: { id: number; name: string; colour: string }
  revision: { id: number; number: number; artworkId: number; title: string; vectorUrl: string }
  createdAt: string
  createdBy: string
  jobs: { id: number; kind: 'initial' | 'reprint'; quantity: number; state: JobState }[]
}

export interface RobotView {
  id: number
  name: string
  season: string
  team: { id: number; name: string; colour: string }
  placements: PlacementView[]
  /** What the viewer may do here; 'queue.work' opens the jobs' pages. */
  can: Can<'placement.create' | 'placement.reprint' | 'queue.work'>
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
}

export interface JobView {
  id: number
  kind: 'initial' | 'reprint'
  quantity: number
  reason: string
  state: JobState
  createdAt: string
  createdBy: string
  cutAt: string | null
  cutBy: string | null
  appliedAt: string | null
  appliedBy: string | null
  placement: { id: number; spot: string; widthMm: number; heightMm: number }
  robot: { id: number; name: string; season: string }
  team: { id: number; name: string; colour: string }
  revision: { id: number; number: number; artworkId: number; title: string; vectorUrl: string }
  film: Film
}

export interface JobDetail extends JobView {
  layout: { perSheet: number; sheets: number; turned: boolean; usagePercent: number; fits: boolean; reason?: string; columns: number; rows: number }
  cutLengthMm: number
  pieces: number
  estimate: { seconds: number; text: string; how: string }
  history: { at: string; action: AuditAction; by: string | null; detail: Record<string, unknown> }[]
  can: Can<'queue.work'>
}
