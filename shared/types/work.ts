// Work done in the background (the work queue): what the browser sees while it waits.

export const WORK_STATES = ['queued', 'running', 'done', 'failed'] as const
export type WorkState = (typeof WORK_STATES)[number]

export const WORK_KINDS = ['upload', 'revise', 'cut-sheet'] as const
export type WorkKind = (typeof WORK_KINDS)[number]

/** The steps of making a revision, in order, with the share of the work done when each begins. */
export const WORK_PHASES = {
  waiting: { percent: 0, words: 'Waiting for a free worker…' },
  reading: { percent: 5, words: 'Reading the picture…' },
  outlining: { percent: 15, words: 'Making the outline…' },
  storing: { percent: 80, words: 'Keeping the files…' },
  saving: { percent: 95, words: 'Saving the revision…' },
  finished: { percent: 100, words: 'Finished.' },
} as const
export type WorkPhase = keyof typeof WORK_PHASES

export interface WorkResult { artworkId: number; revisionId: number }
/** What building a cut sheet leaves: the kept set's content key and how many sheets it has. */
export interface SheetWorkResult { sheetKey: string; sheets: number }
export interface WorkError { status: number; message: string; data?: unknown }

export interface WorkItemView {
  id: number
  kind: WorkKind
  state: WorkState
  phase: WorkPhase
  percent: number
  attempts: number
  result: WorkResult | SheetWorkResult | null
  error: WorkError | null
  createdAt: string
  finishedAt: string | null
  can: { cancel: boolean }
}

/** The answer while the work is still going on (202). */
export interface WorkAccepted { workItem: WorkItemView }
