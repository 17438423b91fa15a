import { sql, type Kysely } from 'kysely'

// The automatic clean-up: each revision records what was chosen for it and why (one entry per
// choice: the setting, whether the pipeline chose it, the value as it would be written to pin
// it, and the reason), and the width asked for, which is now the drawing's (its ink's) rather
// than the whole picture's; width_mm stays the decal's, margin included. Revisions made before
// this have no choices recorded and no drawing width (their width was the picture's).
// Adding columns is not an update of any row: the revisions' immutability trigger stays quiet.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('revision')
    .addColumn('choices', 'jsonb', (c) => c.notNull().defaultTo(sql`'[]'::jsonb`))
    .addColumn('drawing_width_mm', 'double precision', (c) => c.check(sql`drawing_width_mm > 0`))
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('revision').dropColumn('drawing_width_mm').dropColumn('choices').execute()
}
