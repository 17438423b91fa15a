import { sql, type Kysely } from 'kysely'

// Artworks, their uploaded sources and their immutable revisions.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.createTable('artwork')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('team_id', 'integer', (c) => c.notNull().references('team.id'))
    .addColumn('title', 'text', (c) => c.notNull().check(sql`length(trim(title)) between 1 and 120`))
    .addColumn('author_id', 'integer', (c) => c.notNull().references('users.id'))
    // Review states, shown as words: draft, in review, approved, sent back.
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('draft').check(sql`status in ('draft', 'in-review', 'approved', 'sent-back')`))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await db.schema.createIndex('artwork_team_updated').on('artwork').columns(['team_id', 'updated_at']).execute()

  await db.schema.createTable('source')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('artwork_id', 'integer', (c) => c.notNull().references('artwork.id').onDelete('cascade'))
    .addColumn('object_key', 'text', (c) => c.notNull())
    .addColumn('content_hash', 'text', (c) => c.notNull().check(sql`content_hash ~ '^[0-9a-f]{64}$'`))
    .addColumn('media_type', 'text', (c) => c.notNull())
    .addColumn('file_name', 'text', (c) => c.notNull())
    .addColumn('width_px', 'integer', (c) => c.notNull())
    .addColumn('height_px', 'integer', (c) => c.notNull())
    .addColumn('bytes', 'integer', (c) => c.notNull())
    .addColumn('uploaded_by', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()

  await db.schema.createTable('revision')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('artwork_id', 'integer', (c) => c.notNull().references('artwork.id').onDelete('cascade'))
    .addColumn('number', 'integer', (c) => c.notNull().check(sql`number >= 1`))
    .addColumn('source_id', 'integer', (c) => c.notNull().references('source.id'))
    .addColumn('settings', 'jsonb', (c) => c.notNull())
    .addColumn('width_mm', 'double precision', (c) => c.notNull().check(sql`width_mm > 0`))
    .addColumn('height_mm', 'double precision', (c) => c.notNull().check(sql`height_mm > 0`))
    .addColumn('prepared_key', 'text', (c) => c.notNull())
    .addColumn('outline_key', 'text', (c) => c.notNull())
    .addColumn('vector_key', 'text', (c) => c.notNull())
    .addColumn('measurements', 'jsonb', (c) => c.notNull())
    .addColumn('timings', 'jsonb', (c) => c.notNull())
    .addColumn('engine_versions', 'jsonb', (c) => c.notNull())
    .addColumn('author_id', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('revision_number_unique', ['artwork_id', 'number'])
    .execute()

  // A revision is immutable: settings, files and measurements never change once written.
  await sql`
    create function revision_is_immutable() returns trigger language plpgsql as $$
    begin
      raise exception 'revision % is immutable; make a new revision instead', old.id using errcode = 'check_violation';
    end $$;
  `.execute(db)
  await sql`create trigger revision_immutable before update on revision for each row execute function revision_is_immutable()`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('revision').execute()
  await sql`drop function revision_is_immutable()`.execute(db)
  await db.schema.dropTable('source').execute()
  await db.schema.dropTable('artwork').execute()
}
