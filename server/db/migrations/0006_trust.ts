import { sql, type Kysely } from 'kysely'

// Trust: mail written in the change's own transaction and sent after commit; sessions the
// server can end; rate counts that are read and raised in one statement.
export async function up(db: Kysely<any>): Promise<void> {
  // The transactional outbox. A sender delivers rows whose time has come, with retries and a
  // growing wait; nothing is lost while the SMTP server is down.
  await db.schema.createTable('mail_outbox')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('program_id', 'integer', (c) => c.references('program.id').onDelete('cascade'))
    .addColumn('to_email', 'text', (c) => c.notNull())
    .addColumn('subject', 'text', (c) => c.notNull())
    .addColumn('text', 'text', (c) => c.notNull())
    .addColumn('html', 'text', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('next_attempt_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('last_error', 'text')
    .addColumn('sent_at', 'timestamptz')
    .execute()
  await sql`create index mail_outbox_due on mail_outbox (next_attempt_at, id) where sent_at is null`.execute(db)
  await sql`create index mail_outbox_inbox on mail_outbox (lower(to_email), id)`.execute(db)
  await sql`create index mail_outbox_program_waiting on mail_outbox (program_id, id) where sent_at is null`.execute(db)

  // A session is a row: the cookie carries its random id, the table only the id's hash, and
  // ending a session (sign-out, reset, deactivation, "sign out everywhere") is one update.
  await db.schema.createTable('user_session')
    .addColumn('id_hash', 'text', (c) => c.primaryKey())
    .addColumn('user_id', 'integer', (c) => c.notNull().references('users.id').onDelete('cascade'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('last_seen_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('expires_at', 'timestamptz', (c) => c.notNull())
    .addColumn('ended_at', 'timestamptz')
    .addColumn('ended_why', 'text')
    .execute()
  await sql`create index user_session_open on user_session (user_id) where ended_at is null`.execute(db)

  // Counts in fixed windows (sign-in failures, reset requests), raised and read in one
  // statement so parallel requests cannot all slip under a limit.
  await db.schema.createTable('rate_count')
    .addColumn('key', 'text', (c) => c.primaryKey())
    .addColumn('window_started_at', 'timestamptz', (c) => c.notNull())
    .addColumn('count', 'integer', (c) => c.notNull())
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('rate_count').execute()
  await db.schema.dropTable('user_session').execute()
  await db.schema.dropTable('mail_outbox').execute()
}
