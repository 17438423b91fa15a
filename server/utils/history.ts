import { sql } from 'kysely'
import type { HistoryEntry } from '#shared/types/api'
import type { Actor } from './actor'

async function entries(programId: number, where: ReturnType<typeof sql<boolean>>): Promise<HistoryEntry[]> {
  const rows = await useDb().selectFrom('audit_event').leftJoin('users', 'users.id', 'audit_event.actor_id')
    .select(['audit_event.id', 'audit_event.at', 'audit_event.action', 'audit_event.subject_type', 'audit_event.subject_id', 'audit_event.detail', 'users.name'])
    .where('audit_event.program_id', '=', programId)
    .where(where)
    .orderBy('audit_event.id').limit(500).execute()
  return rows.map((r) => ({ id: r.id, at: new Date(r.at).toISOString(), action: r.action, by: r.name, subjectType: r.subject_type, subjectId: r.subject_id, detail: r.detail }))
}

/** Who uploaded, tuned, submitted, reviewed and placed this artwork, and when. */
export async function artworkHistory(actor: Actor, artworkId: number): Promise<HistoryEntry[]> {
  await findArtwork(actor, artworkId)
  const id = String(artworkId)
  return entries(actor.programId, sql<boolean>`(audit_event.subject_type = 'artwork' and audit_event.subject_id = ${id})
    or (audit_event.action = 'place' and audit_event.detail->>'artworkId' = ${id})`)
}

/** Every placement on this robot and every cut, application and reprint of them. */
export async function robotHistory(actor: Actor, robotId: number): Promise<HistoryEntry[]> {
  const robot = await findRobot(actor, robotId)
  const placements = robot.placements.map((p) => String(p.id))
  return entries(actor.programId, sql<boolean>`(audit_event.subject_type = 'robot' and audit_event.subject_id = ${String(robotId)})
    or (audit_event.subject_type = 'job' and audit_event.detail->>'placementId' = any(${placements.length ? placements : ['0']}))`)
}
