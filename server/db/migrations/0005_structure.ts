import { sql, type Kysely } from 'kysely'

// History by indexed columns instead of scans of the JSON detail, and the indexes the lists'
// keyset pages walk in order.
export async function up(db: Kysely<any>): Promise<void> {
  // What each history line is about. Plain integers, not foreign keys: the history outlives
  // nothing it names, and must never stop a change to what it names.
  await db.schema.alterTable('audit_event')
    .addColumn('artwork_id', 'integer')
    .addColumn('robot_id', 'integer')
    .addColumn('job_id', 'integer')
    .execute()
  const id = (expression: string) => sql.raw(`case when ${expression} ~ '^[0-9]{1,9}$' then (${expression})::integer end`)
  await sql`update audit_event set artwork_id = ${id('subject_id')} where subject_type = 'artwork'`.execute(db)
  await sql`update audit_event set artwork_id = ${id(`detail->>'artworkId'`)} where action = 'place'`.execute(db)
  await sql`update audit_event set robot_id = ${id('subject_id')} where subject_type = 'robot'`.execute(db)
  await sql`update audit_event set job_id = ${id('subject_id')} where subject_type = 'job'`.execute(db)
  // A job's lines belong to the robot its placement is on.
  await sql`update audit_event a set robot_id = p.robot_id from placement p
    where a.subject_type = 'job' and p.id = ${id(`a.detail->>'placementId'`)}`.execute(db)
  for (const column of ['artwork_id', 'robot_id', 'job_id']) {
    await sql`create index ${sql.raw(`audit_event_${column}`)} on audit_event (${sql.raw(column)}, id) where ${sql.raw(column)} is not null`.execute(db)
  }
  // The program's activity, newest first.
  await sql`create index audit_event_program_id on audit_event (program_id, id)`.execute(db)

  // Artworks, most recently changed first (all of a program's, or one team's).
  await sql`drop index artwork_team_updated`.execute(db)
  await sql`create index artwork_team_order on artwork (team_id, updated_at, id)`.execute(db)
  await sql`create index artwork_order on artwork (updated_at, id)`.execute(db)
  await sql`create index source_artwork on source (artwork_id, id)`.execute(db)
  // The review queue: revisions in review, oldest first.
  await sql`create index revision_status_in_review on revision_status (updated_at, revision_id) where status = 'in-review'`.execute(db)
  // Robots by team, newest season first, then by name.
  await sql`create index robot_order on robot (team_id, season desc, name, id)`.execute(db)
  await sql`create index placement_robot on placement (robot_id, id)`.execute(db)
  // The cut queue: queued jobs first, oldest first; then the rest, newest first.
  await sql`create index job_queue_order on job (((state <> 'queued')::integer), (case when state = 'queued' then id else -id end))`.execute(db)
  await sql`create index job_placement on job (placement_id, id)`.execute(db)
  await sql`create index review_event_revision on review_event (revision_id, id)`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const index of ['review_event_revision', 'job_placement', 'job_queue_order', 'placement_robot', 'robot_order', 'revision_status_in_review', 'source_artwork', 'artwork_order', 'artwork_team_order', 'audit_event_program_id', 'audit_event_artwork_id', 'audit_event_robot_id', 'audit_event_job_id']) {
    await sql`drop index if exists ${sql.raw(index)}`.execute(db)
  }
  await sql`create index artwork_team_updated on artwork (team_id, updated_at)`.execute(db)
  await db.schema.alterTable('audit_event').dropColumn('artwork_id').dropColumn('robot_id').dropColumn('job_id').execute()
}
