import { sql, type Kysely } from 'kysely'

// Number plates.
// - rule_profile: a program's competition rules for number plates. A row either follows a
//   shipped preset by its key (the app's copy in shared/plates/profiles.ts applies, so a new
//   release's corrections reach it) or holds the program's own edited copy as JSON, every
//   field of the profile with the manual, season and rule number beside each value.
// - program.rule_profile_id: the profile that applies to every team of the program; the
//   composite key keeps it to the program's own profiles.
// - placement.side: which side of the robot a decal is on, beside the free-text spot; rows
//   from before have none.
// - revision.origin: 'traced' from a source picture through the pipeline, or 'generated', an
//   exact vector made by the plate generator, which has no source, prepared bitmap or raw
//   outline; revision.plate records what was asked for such a revision.
// Adding and loosening columns updates no row: the revisions' immutability trigger stays quiet.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.createTable('rule_profile')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('program_id', 'integer', (c) => c.notNull().references('program.id').onDelete('cascade'))
    .addColumn('name', 'text', (c) => c.notNull().check(sql`length(name) between 1 and 120`))
    .addColumn('preset_key', 'text')
    .addColumn('profile', 'jsonb')
    .addColumn('copied_from', 'text')
    .addColumn('created_by', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('rule_profile_preset_or_copy', sql`(preset_key is null) <> (profile is null)`)
    .addUniqueConstraint('rule_profile_preset_once', ['program_id', 'preset_key'])
    .addUniqueConstraint('rule_profile_of_program', ['id', 'program_id'])
    .execute()

  await db.schema.alterTable('program').addColumn('rule_profile_id', 'integer').execute()
  await sql`alter table program add constraint program_rule_profile_own
    foreign key (rule_profile_id, id) references rule_profile (id, program_id)`.execute(db)

  await db.schema.alterTable('placement')
    .addColumn('side', 'text', (c) => c.check(sql`side in ('front', 'back', 'left', 'right', 'top', 'other')`))
    .execute()

  await db.schema.alterTable('revision')
    .addColumn('origin', 'text', (c) => c.notNull().defaultTo('traced').check(sql`origin in ('traced', 'generated')`))
    .addColumn('plate', 'jsonb')
    .execute()
  await sql`alter table revision alter column source_id drop not null,
    alter column prepared_key drop not null, alter column outline_key drop not null`.execute(db)
  await sql`alter table revision add constraint revision_files_of_origin check (
    (origin = 'traced' and source_id is not null and prepared_key is not null and outline_key is not null)
    or (origin = 'generated' and source_id is null and prepared_key is null and outline_key is null and plate is not null))`.execute(db)
  // The robot check finds the plates among a team's approved revisions.
  await sql`create index revision_generated on revision (artwork_id) where origin = 'generated'`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`delete from revision where origin = 'generated'`.execute(db)
  await sql`drop index revision_generated`.execute(db)
  await sql`alter table revision drop constraint revision_files_of_origin`.execute(db)
  await sql`alter table revision alter column source_id set not null,
    alter column prepared_key set not null, alter column outline_key set not null`.execute(db)
  await db.schema.alterTable('revision').dropColumn('plate').dropColumn('origin').execute()
  await db.schema.alterTable('placement').dropColumn('side').execute()
  await db.schema.alterTable('program').dropColumn('rule_profile_id').execute()
  await db.schema.dropTable('rule_profile').execute()
}
