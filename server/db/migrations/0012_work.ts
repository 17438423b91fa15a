import { sql, type Kysely } from 'kysely'

// The work queue: each piece of background work (a revision to make) is a work_item, which the
// browser reads for its progress and result; the job that runs it lives in graphile-worker's
// own schema (installed at start-up by the queue itself) and names the item in its payload.
// While an item is queued or running its stored source (source_key) counts as in use, so the
// sweeper of unused files leaves it alone however long the item waits.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.createTable('work_item')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('program_id', 'integer', (c) => c.notNull().references('program.id').onDelete('cascade'))
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('upload', 'revise')`))
    .addColumn('state', 'text', (c) => c.notNull().defaultTo('queued').check(sql`state in ('queued', 'running', 'done', 'failed')`))
    .addColumn('phase', 'text', (c) => c.notNull().defaultTo('waiting'))
    .addColumn('percent', 'integer', (c) => c.notNull().defaultTo(0).check(sql`percent between 0 and 100`))
    .addColumn('input', 'jsonb', (c) => c.notNull())
    .addColumn('source_key', 'text')
    .addColumn('result', 'jsonb')
    .addColumn('error', 'jsonb')
    .addColumn('attempts', 'integer', (c) => c.notNull().defaultTo(0))
    .addColumn('asked_by', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('started_at', 'timestamptz')
    .addColumn('finished_at', 'timestamptz')
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    // A finished item has its outcome; an unfinished one has none.
    .addCheckConstraint('work_item_outcome', sql`(state = 'done') = (result is not null) and (state = 'failed') = (error is not null)`)
    .execute()
  await sql`create index work_item_unfinished_source on work_item (source_key) where state in ('queued', 'running')`.execute(db)
  await sql`create index work_item_asked_by on work_item (asked_by, created_at desc)`.execute(db)

  // The queue's worker processes, so a worker that died holding jobs is noticed and its jobs
  // handed to the others (graphile-worker would otherwise wait hours for their locks to expire).
  await db.schema.createTable('work_runner')
    .addColumn('worker_id', 'text', (c) => c.primaryKey())
    .addColumn('host', 'text', (c) => c.notNull())
    .addColumn('pid', 'integer', (c) => c.notNull())
    .addColumn('seen_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.dropTable('work_runner').execute()
  await db.schema.dropTable('work_item').execute()
}
