import { sql, type Kysely } from 'kysely'

// The automatic clean-up: each revision records what was chosen for it and why (one entry per
// choice: the setting, whether the pipeline chose it, the value as it would be written to pin
// it, and the reason). Revisions made before this have none recorded.
// Adding a column is not an update of any row: the revisions' immutability trigger stays quiet.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('revision')
    .addColumn('choices', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('revision').dropColumn('choices').execute()
}
