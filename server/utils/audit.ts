import type { H3Event } from 'h3'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../db/schema'

export interface AuditInput {
  programId: number | null
  actorId: number | null
  action: string
  subjectType: string
  subjectId?: string | number | null
  detail?: Record<string, unknown>
}

/** Writes one line of the history; pass the transaction so it commits or rolls back with the work. */
export async function audit(db: Kysely<Database> | Transaction<Database>, event: H3Event | null, e: AuditInput): Promise<void> {
  await db.insertInto('audit_event').values({
    program_id: e.programId,
    actor_id: e.actorId,
    action: e.action,
    subject_type: e.subjectType,
    subject_id: e.subjectId == null ? null : String(e.subjectId),
    detail: JSON.stringify(e.detail ?? {}),
    ip: event ? getRequestIP(event, { xForwardedFor: true }) ?? null : null,
  }).execute()
}
