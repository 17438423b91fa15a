import { sql, type Transaction } from 'kysely'
import type { Database } from '../db/schema'
import type { ArtworkStatus, ReviewEntry } from '#shared/types/artworks'
import type { Db } from '../platform/db'

/** Who submitted, approved or sent back a revision, oldest first. */
export async function reviewHistory(db: Db, revisionId: number): Promise<ReviewEntry[]> {
  const rows = await db.selectFrom('review_event').innerJoin('users', 'users.id', 'review_event.actor_id')
    .select(['review_event.id', 'review_event.action', 'review_event.comment', 'review_event.at', 'users.name'])
    .where('review_event.revision_id', '=', revisionId).orderBy('review_event.id').execute()
  return rows.map((r) => ({ id: r.id, action: r.action, comment: r.comment, at: new Date(r.at).toISOString(), by: r.name }))
}

/** The revision's status, locked for the rest of the transaction so two reviewers cannot race. */
export async function lockedStatus(trx: Transaction<Database>, revisionId: number): Promise<ArtworkStatus> {
  const row = await trx.selectFrom('revision_status').select('status').where('revision_id', '=', revisionId).forUpdate().executeTakeFirstOrThrow()
  return row.status
}

/** Revisions in review in the program, oldest first, after the row `after`. */
export function inReview(db: Db, programId: number, after: { at: string; id: number } | undefined, limit: number) {
  let q = db.selectFrom('revision_status')
    .innerJoin('revision', 'revision.id', 'revision_status.revision_id')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('team', 'team.id', 'artwork.team_id')
    .innerJoin('users', 'users.id', 'revision.author_id')
    .select(['revision.id', 'revision.number', 'revision.measurements', 'revision.width_mm', 'revision.height_mm', 'revision.layer_count', 'artwork.id as artwork_id', 'artwork.title',
      'team.id as team_id', 'team.name as team_name', 'team.colour as team_colour', 'users.name as author', 'revision_status.updated_at',
      sql<string>`revision_status.updated_at::text`.as('order_at'),
      // Revisions made after this one: the reviewer should know the team has moved on.
      (eb) => eb.selectFrom('revision as later').select(sql<number>`count(*)::int`.as('n'))
        .whereRef('later.artwork_id', '=', 'revision.artwork_id').whereRef('later.number', '>', 'revision.number').as('newer_count'),
      (eb) => eb.selectFrom('revision as later').select(sql<number>`max(later.number)::int`.as('n'))
        .whereRef('later.artwork_id', '=', 'revision.artwork_id').as('latest_number')])
    .where('team.program_id', '=', programId).where('revision_status.status', '=', 'in-review')
  if (after) q = q.where(sql<boolean>`(revision_status.updated_at, revision_status.revision_id) > (${after.at}::timestamptz, ${after.id})`)
  return q.orderBy('revision_status.updated_at').orderBy('revision_status.revision_id').limit(limit).execute()
}

export function activeMentorEmails(db: Db, programId: number) {
  return db.selectFrom('mentorship').innerJoin('users', 'users.id', 'mentorship.user_id')
    .select('users.email').where('mentorship.program_id', '=', programId).where('users.active', '=', true).execute()
}

/** Active people to tell of a decision: the revision's author and its latest submitter, without repeats. */
export function decisionRecipients(db: Db, revisionId: number, authorId: number) {
  const submitter = db.selectFrom('review_event').select('actor_id')
    .where('revision_id', '=', revisionId).where('action', '=', 'submit').orderBy('id', 'desc').limit(1)
  return db.selectFrom('users').select(['id', 'email', 'name'])
    .where('active', '=', true)
    .where((eb) => eb.or([eb('id', '=', authorId), eb('id', 'in', submitter)]))
    .orderBy('id').execute()
}
