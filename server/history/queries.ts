import { sql } from 'kysely'
import { z } from 'zod'
import type { HistoryEntry } from '#shared/types/api'
import { auditActionsOf, type AuditKind } from '#shared/types/audit'
import type { Db } from '../platform/db'

export type HistoryOf = { artworkId: number } | { robotId: number } | { jobId: number }

const HISTORY_LIMIT = 500

export async function historyLines(db: Db, programId: number, of: HistoryOf): Promise<HistoryEntry[]> {
  let q = db.selectFrom('audit_event').leftJoin('users', 'users.id', 'audit_event.actor_id')
    .select(['audit_event.id', 'audit_event.at', 'audit_event.action', 'audit_event.subject_type', 'audit_event.subject_id', 'audit_event.detail', 'users.name'])
    .where('audit_event.program_id', '=', programId)
  if ('artworkId' in of) q = q.where('audit_event.artwork_id', '=', of.artworkId)
  else if ('robotId' in of) q = q.where('audit_event.robot_id', '=', of.robotId)
  else q = q.where('audit_event.job_id', '=', of.jobId)
  const rows = await q.orderBy('audit_event.id').limit(HISTORY_LIMIT).execute()
  return rows.map((r) => ({ id: r.id, at: new Date(r.at).toISOString(), action: r.action, by: r.name, subjectType: r.subject_type, subjectId: r.subject_id, detail: r.detail }))
}

export const cursorKey = z.number().int().positive()

export interface AuditFilter { actorId?: number; kind?: AuditKind; teamId?: number; from?: string; to?: string }

export function auditPage(db: Db, programId: number, f: AuditFilter, beforeId: number | undefined, limit: number) {
  let q = db.selectFrom('audit_event').leftJoin('users', 'users.id', 'audit_event.actor_id')
    .select(['audit_event.id', 'audit_event.at', 'audit_event.action', 'audit_event.subject_type', 'audit_event.subject_id', 'audit_event.detail', 'users.id as actor_id', 'users.name as actor_name'])
    .where('audit_event.program_id', '=', programId)
  if (f.actorId) q = q.where('audit_event.actor_id', '=', f.actorId)
  if (f.kind) q = q.where('audit_event.action', 'in', auditActionsOf(f.kind))
  // Days are whole UTC days, both ends included.
  if (f.from) q = q.where('audit_event.at', '>=', sql<Date>`${f.from}::date`)
  if (f.to) q = q.where('audit_event.at', '<', sql<Date>`${f.to}::date + 1`)
  if (f.teamId) {
    // A line belongs to a team through the artwork, robot or job it is about.
    const teamId = f.teamId
    q = q.where((eb) => eb.or([
      eb('audit_event.artwork_id', 'in', eb.selectFrom('artwork').select('artwork.id').where('artwork.team_id', '=', teamId)),
      eb('audit_event.robot_id', 'in', eb.selectFrom('robot').select('robot.id').where('robot.team_id', '=', teamId)),
      eb('audit_event.job_id', 'in', eb.selectFrom('job').innerJoin('placement', 'placement.id', 'job.placement_id')
        .innerJoin('robot', 'robot.id', 'placement.robot_id').select('job.id').where('robot.team_id', '=', teamId)),
    ]))
  }
  if (beforeId !== undefined) q = q.where('audit_event.id', '<', beforeId)
  return q.orderBy('audit_event.id', 'desc').limit(limit).execute()
}
