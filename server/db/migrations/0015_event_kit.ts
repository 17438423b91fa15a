import type { Kysely } from 'kysely'

// The event kit: a placement marked as needed at events travels with the robot, its spares
// queued with the plates' when the team asks for the kit. Rows from before are not marked.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('placement')
    .addColumn('needed_at_events', 'boolean', (c) => c.notNull().defaultTo(false))
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('placement').dropColumn('needed_at_events').execute()
}
