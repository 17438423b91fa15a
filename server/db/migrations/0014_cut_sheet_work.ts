import { sql, type Kysely } from 'kysely'

// Cut sheets are built as work items too (the queue's build-cut-sheet task), so the browser
// follows them as it follows a revision, and `npm run worker` processes can build them.
export async function up(db: Kysely<any>): Promise<void> {
  await sql`alter table work_item drop constraint work_item_kind_check`.execute(db)
  await sql`alter table work_item add constraint work_item_kind_check check (kind in ('upload', 'revise', 'cut-sheet'))`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`delete from work_item where kind = 'cut-sheet'`.execute(db)
  await sql`alter table work_item drop constraint work_item_kind_check`.execute(db)
  await sql`alter table work_item add constraint work_item_kind_check check (kind in ('upload', 'revise'))`.execute(db)
}
