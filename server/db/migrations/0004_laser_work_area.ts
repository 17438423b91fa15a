import { sql, type Kysely } from 'kysely'

// The lab laser's work area, so a design too large for the machine is caught on the bench.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('program')
    .addColumn('laser_work_width_mm', 'double precision', (c) => c.check(sql`laser_work_width_mm > 0 and laser_work_width_mm <= 5000`))
    .addColumn('laser_work_height_mm', 'double precision', (c) => c.check(sql`laser_work_height_mm > 0 and laser_work_height_mm <= 5000`))
    .execute()
  await db.schema.alterTable('program')
    .addCheckConstraint('program_work_area_both_or_neither', sql`(laser_work_width_mm is null) = (laser_work_height_mm is null)`)
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('program').dropConstraint('program_work_area_both_or_neither').execute()
  await db.schema.alterTable('program').dropColumn('laser_work_width_mm').dropColumn('laser_work_height_mm').execute()
}
