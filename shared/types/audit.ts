// Every kind of line in the history, with what each one records. The server's audit writer
// accepts only these; the pages that tell the history turn each one into a sentence.
import type { MemberRole, Role } from './roles'
import type { CutFailure } from './robots'

interface RevisionRef { title: string; revision: number }
interface JobRef { title: string; robot: string; spot: string; quantity: number }
interface PlacementRef { placementId: number; title: string; robot: string; spot: string }

export interface AuditDetails {
  'sign-in': Record<string, never>
  'sign-in-failed': { reason: 'deactivated' | 'wrong password' }
  'create-team': { name: string }
  'update-team': { name?: string; number?: string | null; colour?: string }
  'rename-person': { from: string; to: string }
  'deactivate': { name: string }
  'reactivate': { name: string }
  'sign-out-everywhere': { name: string; sessions: number }
  'change-role': { name: string; mentor: boolean } | { name: string; team: string; from: MemberRole | null; to: MemberRole | null }
  'invite': { email: string; name: string; role: Role; team: string | null }
  'withdraw-invitation': { email: string }
  'accept-invitation': { role: Role }
  'request-reset': Record<string, never>
  'set-first-password': Record<string, never>
  'reset-password': Record<string, never>
  /** Written by `npm run create-mentor`. */
  'create-mentor': { email: string; via: string }
  /** Written when the demo program is loaded. */
  'load-demo': Record<string, never>
  'set-work-area': { laserWorkArea: { widthMm: number; heightMm: number } | null }
  'upload': RevisionRef & { fileName: string }
  'revise': RevisionRef
  'submit': RevisionRef
  'approve': RevisionRef & { comment: string }
  'send-back': RevisionRef & { comment: string }
  'add-robot': { name: string; season: string }
  'place': RevisionRef & { spot: string; film: string; quantity: number; spares: number }
  'queue-job': JobRef & { reason: string }
  'reprint': JobRef & { reason: string }
  /** A job queued for copies a placement's edit added. */
  'queue-extra': JobRef & { reason: string }
  /** A job queued to cut again what a failed cut spoilt. */
  'recut': JobRef & { reason: string; recutOf: number }
  'mark-cut': JobRef & { sheets?: number; batchId?: number }
  /** A queued job put in a batch, to be cut on shared sheets with the batch's other jobs. */
  'join-batch': JobRef & { batchId: number }
  'leave-batch': JobRef & { batchId: number }
  'mark-applied': JobRef & { applied?: number }
  'cancel-job': JobRef & { reason: string }
  'fail-job': JobRef & { failure: CutFailure; note: string; recutJobId: number; recutCopies: number }
  'edit-placement': PlacementRef & { changes: Record<string, { from: unknown; to: unknown }> }
  'remove-placement': PlacementRef & { reason: string }
  'apply-spare': PlacementRef & { count: number; reason: string; sparesOnHand: number }
  'edit-robot': { name: string; season: string; from: { name: string; season: string } }
  'rename-artwork': { from: string; to: string }
  'add-film': { name: string; polymer: string }
  'update-film': { name: string } & Record<string, unknown>
  /** Written by migration 0008: a film's typed polymer read through the register. */
  'register-film': { name: string; typed: string; polymer: string; retired: boolean; reason: string | null }
  'approve-film': { name: string; polymer: string; safetyDataSheet: string }
  'withdraw-film-approval': { name: string; polymer: string }
  'test-film': { name: string; square: string | null; powerPct: number | null; speedMmS: number | null; passes: number; kerfMm: number | null }
  'film-stock': { name: string; kind: 'delivery' | 'count'; sheets: number; onHand: number; note: string }
  'add-rule-profile': { name: string; from: string | null }
  'edit-rule-profile': { name: string }
  'choose-rule-profile': { name: string | null }
  /** One line per layer of a generated plate (each an artwork of its own). */
  'generate-plate': RevisionRef & { teamNumber: string; profile: string; role: string; colour: string }
}

export type AuditAction = keyof AuditDetails

// A record, so that an action added above and forgotten here fails to compile.
const KNOWN: Record<AuditAction, true> = {
  'sign-in': true, 'sign-in-failed': true, 'create-team': true, 'update-team': true, 'rename-person': true,
  'deactivate': true, 'reactivate': true, 'sign-out-everywhere': true, 'change-role': true, 'invite': true, 'withdraw-invitation': true,
  'accept-invitation': true, 'request-reset': true, 'set-first-password': true, 'reset-password': true,
  'create-mentor': true, 'load-demo': true, 'set-work-area': true, 'upload': true, 'revise': true, 'submit': true,
  'approve': true, 'send-back': true, 'add-robot': true, 'place': true, 'queue-job': true, 'reprint': true,
  'mark-cut': true, 'mark-applied': true, 'add-film': true, 'update-film': true,
  'queue-extra': true, 'recut': true, 'cancel-job': true, 'fail-job': true, 'edit-placement': true, 'remove-placement': true,
  'apply-spare': true, 'edit-robot': true, 'rename-artwork': true, 'register-film': true, 'approve-film': true,
  'withdraw-film-approval': true, 'test-film': true, 'film-stock': true, 'join-batch': true, 'leave-batch': true,
  'add-rule-profile': true, 'edit-rule-profile': true, 'choose-rule-profile': true, 'generate-plate': true,
}
export const AUDIT_SUBJECTS = ['user', 'team', 'invitation', 'program', 'artwork', 'robot', 'job', 'film'] as const
export type AuditSubject = (typeof AUDIT_SUBJECTS)[number]

export function isAuditAction(action: string): action is AuditAction {
  return Object.hasOwn(KNOWN, action)
}

/** Kinds of history line a person can filter the activity by. */
export const AUDIT_KINDS = ['accounts', 'artworks', 'robots', 'jobs', 'films', 'program'] as const
export type AuditKind = (typeof AUDIT_KINDS)[number]
export const AUDIT_KIND_LABELS: Record<AuditKind, string> = {
  accounts: 'Accounts and sign-ins', artworks: 'Artworks and review', robots: 'Robots and placements',
  jobs: 'Cut queue', films: 'Films', program: 'Teams and the program',
}

// A record, so that a new action must be given its kind.
const KIND_OF: Record<AuditAction, AuditKind> = {
  'sign-in': 'accounts', 'sign-in-failed': 'accounts', 'rename-person': 'accounts', 'deactivate': 'accounts', 'reactivate': 'accounts',
  'sign-out-everywhere': 'accounts', 'change-role': 'accounts', 'invite': 'accounts', 'withdraw-invitation': 'accounts',
  'accept-invitation': 'accounts', 'request-reset': 'accounts', 'set-first-password': 'accounts', 'reset-password': 'accounts', 'create-mentor': 'accounts',
  'upload': 'artworks', 'revise': 'artworks', 'submit': 'artworks', 'approve': 'artworks', 'send-back': 'artworks', 'rename-artwork': 'artworks',
  'add-robot': 'robots', 'edit-robot': 'robots', 'place': 'robots', 'edit-placement': 'robots', 'remove-placement': 'robots', 'apply-spare': 'robots',
  'queue-job': 'jobs', 'reprint': 'jobs', 'queue-extra': 'jobs', 'recut': 'jobs', 'mark-cut': 'jobs', 'mark-applied': 'jobs', 'cancel-job': 'jobs', 'fail-job': 'jobs',
  'add-film': 'films', 'update-film': 'films', 'register-film': 'films', 'approve-film': 'films', 'withdraw-film-approval': 'films', 'test-film': 'films', 'film-stock': 'films',
  'join-batch': 'jobs', 'leave-batch': 'jobs', 'generate-plate': 'artworks',
  'create-team': 'program', 'update-team': 'program', 'load-demo': 'program', 'set-work-area': 'program',
  'add-rule-profile': 'program', 'edit-rule-profile': 'program', 'choose-rule-profile': 'program',
}

export function auditActionsOf(kind: AuditKind): AuditAction[] {
  return (Object.keys(KIND_OF) as AuditAction[]).filter((a) => KIND_OF[a] === kind)
}
