// The history: one line per change, written inside the change's own transaction, and read
// back per artwork, robot, job or for the whole program.
import type { AuditAction, AuditDetails, AuditSubject } from '#shared/types/audit'
import type { AuditEntry, HistoryEntry, Page } from '#shared/types/api'
import type { Db } from '../platform/db'
import type { Actor } from '../policy'
import { decodeCursor, pageOf } from '../platform/cursor'
import { auditPage, cursorKey, historyLines, type AuditFilter, type HistoryOf } from './queries'

export interface AuditLine<A extends AuditAction> {
  /** Who and from where: `by(actor)`, or the same fields for someone not signed in yet. */
  programId: number | null
  actorId: number | null
  ip: string | null
  action: A
  subject: AuditSubject
  subjectId?: number | string | null
  detail: AuditDetails[A]
  /** What else the line is about, beyond its subject (a placement names its artwork too). */
  about?: { artworkId?: number; robotId?: number; jobId?: number }
}

export function by(actor: Actor): { programId: number; actorId: number; ip: string | null } {
  return { programId: actor.programId, actorId: actor.id, ip: actor.ip }
}

/** Writes one line of the history; pass the transaction so it commits or rolls back with the work. */
export async function audit<A extends AuditAction>(db: Db, line: AuditLine<A>): Promise<void> {
  const subjectId = line.subjectId == null ? null : Number(line.subjectId)
  const about = (kind: AuditSubject, given: number | undefined) => given ?? (line.subject === kind && Number.isInteger(subjectId) ? subjectId : null)
  await db.insertInto('audit_event').values({
    program_id: line.programId,
    actor_id: line.actorId,
    action: line.action,
    subject_type: line.subject,
    subject_id: line.subjectId == null ? null : String(line.subjectId),
    detail: JSON.stringify(line.detail),
    ip: line.ip,
    artwork_id: about('artwork', line.about?.artworkId),
    robot_id: about('robot', line.about?.robotId),
    job_id: about('job', line.about?.jobId),
  }).execute()
}

/** The lines about one artwork, robot or job, oldest first. The caller has checked the actor may see it. */
export function historyOf(db: Db, actor: Actor, of: HistoryOf): Promise<HistoryEntry[]> {
  return historyLines(db, actor.programId, of)
}

/** The program's activity, newest first, a page at a time. */
export async function listAudit(db: Db, actor: Actor, o: AuditFilter & { cursor?: string; limit: number }): Promise<Page<AuditEntry>> {
  const after = decodeCursor(o.cursor, cursorKey)
  const rows = await auditPage(db, actor.programId, o, after, o.limit + 1)
  return pageOf(rows, o.limit, (r) => ({
    id: r.id, at: new Date(r.at).toISOString(), action: r.action,
    actor: r.actor_id ? { id: r.actor_id, name: r.actor_name! } : null,
    subjectType: r.subject_type, subjectId: r.subject_id, detail: r.detail,
  }), (r) => r.id)
}
