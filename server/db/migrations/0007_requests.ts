import { sql, type Kysely } from 'kysely'

// Requests that must not be done twice and files that must not be lost: the answers to
// requests sent with an Idempotency-Key, claims on stored files while a request uses them,
// and the time of the last sweep for files nothing points at.
export async function up(db: Kysely<any>): Promise<void> {
  // One row per (person, route, key): claimed when the first request starts, the answer kept
  // once it is done, so a second send of the same form gets the first answer again.
  await db.schema.createTable('idempotent_request')
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('route', 'text', (c) => c.notNull())
    .addColumn('key', 'text', (c) => c.notNull())
    .addColumn('fingerprint', 'text', (c) => c.notNull())
    .addColumn('attempt', 'text', (c) => c.notNull())
    .addColumn('started_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('finished_at', 'timestamptz')
    .addColumn('answer', 'jsonb')
    .addPrimaryKeyConstraint('idempotent_request_pkey', ['user_id', 'route', 'key'])
    .execute()
  await sql`create index idempotent_request_started on idempotent_request (started_at)`.execute(db)

  // A request's claim on a stored file's key, from before it looks for the file until its rows
  // point at the file (or it gives up). The sweeper leaves claimed keys alone.
  await db.schema.createTable('object_claim')
    .addColumn('token', 'text', (c) => c.notNull())
    .addColumn('key', 'text', (c) => c.notNull())
    .addColumn('claimed_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addPrimaryKeyConstraint('object_claim_pkey', ['token', 'key'])
    .execute()
  await sql`create index object_claim_key on object_claim (key)`.execute(db)
  await sql`create index object_claim_claimed on object_claim (claimed_at)`.execute(db)

  // Background work done by one app process at a time: the process that moves last_run_at wins.
  await db.schema.createTable('housekeeping')
    .addColumn('task', 'text', (c) => c.primaryKey())
    .addColumn('last_run_at', 'timestamptz', (c) => c.notNull())
    .execute()

  // "Does anything point at this file?" is asked for every swept key.
  await sql`create index source_object_key on source (object_key)`.execute(db)
  for (const column of ['prepared_key', 'outline_key', 'vector_key']) {
    await sql`create index ${sql.raw(`revision_${column}`)} on revision (${sql.raw(column)})`.execute(db)
  }
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const index of ['revision_vector_key', 'revision_outline_key', 'revision_prepared_key', 'source_object_key']) {
    await sql`drop index if exists ${sql.raw(index)}`.execute(db)
  }
  await db.schema.dropTable('housekeeping').execute()
  await db.schema.dropTable('object_claim').execute()
  await db.schema.dropTable('idempotent_request').execute()
}
