import { sql, type Kysely } from 'kysely'

// Batches: several queued jobs in one film cut together on shared sheets. The database keeps
// the batch whole: its jobs are all in its film (a composite key), all of its program, and a
// job joins only while both it and the batch are queued; a job leaves only before it is cut
// (a cancelled job leaves by itself). A film's kerf may now be 0: compensation off.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.createTable('batch')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('program_id', 'integer', (c) => c.notNull().references('program.id').onDelete('cascade'))
    .addColumn('film_id', 'integer', (c) => c.notNull().references('film.id'))
    .addColumn('state', 'text', (c) => c.notNull().defaultTo('queued').check(sql`state in ('queued', 'cut')`))
    .addColumn('created_by', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('cut_by', 'integer', (c) => c.references('users.id'))
    .addColumn('cut_at', 'timestamptz')
    .addColumn('sheets_used', 'integer', (c) => c.check(sql`sheets_used >= 0`))
    .addUniqueConstraint('batch_id_film', ['id', 'film_id'])
    .addCheckConstraint('batch_cut_recorded', sql`(state = 'cut') = (cut_at is not null)`)
    .execute()
  await db.schema.createIndex('batch_program_order').on('batch').columns(['program_id', 'id']).execute()

  await db.schema.alterTable('job').addColumn('batch_id', 'integer').execute()
  // The job's film is the batch's film.
  await sql`alter table job add constraint job_batch_film foreign key (batch_id, film_id) references batch (id, film_id)`.execute(db)
  await db.schema.createIndex('job_batch').on('job').column('batch_id').where(sql.ref('batch_id'), 'is not', null).execute()

  await sql`
    create function job_batch_rules() returns trigger language plpgsql as $$
    declare
      b record;
      job_program integer;
    begin
      -- A cancelled job leaves its batch by itself.
      if new.state = 'cancelled' and new.batch_id is not null then
        new.batch_id := null;
      end if;
      if tg_op = 'UPDATE' and old.batch_id is not null and new.batch_id is distinct from old.batch_id
         and old.state <> 'queued' and new.state <> 'cancelled' then
        raise exception 'job % was cut in batch % and cannot leave it', old.id, old.batch_id using errcode = 'check_violation', constraint = 'job_batch_leave';
      end if;
      if new.batch_id is not null and (tg_op = 'INSERT' or new.batch_id is distinct from old.batch_id) then
        select program_id, state into b from batch where id = new.batch_id;
        select team.program_id into job_program from placement
          join robot on robot.id = placement.robot_id join team on team.id = robot.team_id
          where placement.id = new.placement_id;
        if new.state <> 'queued' or b.state <> 'queued' then
          raise exception 'only a queued job joins a queued batch' using errcode = 'check_violation', constraint = 'job_batch_queued';
        end if;
        if b.program_id is distinct from job_program then
          raise exception 'a batch holds jobs of one program' using errcode = 'check_violation', constraint = 'job_batch_program';
        end if;
      end if;
      return new;
    end $$`.execute(db)
  await sql`create trigger job_batch_rules before insert or update of batch_id, state on job for each row execute function job_batch_rules()`.execute(db)

  for (const table of ['film', 'film_test']) {
    await sql`alter table ${sql.table(table)} drop constraint ${sql.id(`${table}_kerf_mm_check`)}`.execute(db)
    await sql`alter table ${sql.table(table)} add constraint ${sql.id(`${table}_kerf_mm_check`)} check (kerf_mm >= 0 and kerf_mm < 2)`.execute(db)
  }
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop trigger job_batch_rules on job`.execute(db)
  await sql`drop function job_batch_rules()`.execute(db)
  await db.schema.alterTable('job').dropColumn('batch_id').execute()
  await db.schema.dropTable('batch').execute()
}
