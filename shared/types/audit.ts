// Every kind of line in the history, with what each one records. The server's audit writer
// accepts only these; the pages that tell the history turn each one into a sentence.
import type { MemberRole, Role } from './roles'

interface RevisionRef { title: string; revision: number }
interface JobRef { title: string; robot: string; spot: string; quantity: number }

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
  'mark-cut': JobRef
  'mark-applied': JobRef
  'add-film': { name: string; chlorineFree: boolean }
  'update-film': { name: string } & Record<string, unknown>
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
}
export const AUDIT_SUBJECTS = ['user', 'team', 'invitation', 'program', 'artwork', 'robot', 'job', 'film'] as const
export type AuditSubject = (typeof AUDIT_SUBJECTS)[number]

export function isAuditAction(action: string): action is AuditAction {
  return Object.hasOwn(KNOWN, action)
}
