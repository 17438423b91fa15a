import { sql, type Kysely } from 'kysely'

// Review of revisions, film stock with the chlorine rule, robots, placements and cut jobs.
export async function up(db: Kysely<any>): Promise<void> {
  // ---- review ----
  await db.schema.createTable('revision_status')
    .addColumn('revision_id', 'integer', (c) => c.primaryKey().references('revision.id').onDelete('cascade'))
    .addColumn('status', 'text', (c) => c.notNull().defaultTo('draft').check(sql`status in ('draft', 'in-review', 'approved', 'sent-back')`))
    .addColumn('updated_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('updated_by', 'integer', (c) => c.references('users.id'))
    .execute()
  // Every revision starts as a draft, however it was inserted.
  await sql`
    create function revision_starts_as_draft() returns trigger language plpgsql as $$
    begin
      insert into revision_status (revision_id, status, updated_by) values (new.id, 'draft', new.author_id);
      return new;
    end $$;
  `.execute(db)
  await sql`create trigger revision_draft after insert on revision for each row execute function revision_starts_as_draft()`.execute(db)
  await sql`insert into revision_status (revision_id, status, updated_by) select id, 'draft', author_id from revision`.execute(db)
  // An approved revision is locked: its status never changes again.
  await sql`
    create function approved_is_locked() returns trigger language plpgsql as $$
    begin
      if old.status = 'approved' then
        raise exception 'revision % is approved and locked', old.revision_id using errcode = 'check_violation';
      end if;
      return new;
    end $$;
  `.execute(db)
  await sql`create trigger approved_locked before update or delete on revision_status for each row execute function approved_is_locked()`.execute(db)

  await db.schema.createTable('review_event')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('revision_id', 'integer', (c) => c.notNull().references('revision.id').onDelete('cascade'))
    .addColumn('actor_id', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('action', 'text', (c) => c.notNull().check(sql`action in ('submit', 'approve', 'send-back')`))
    .addColumn('comment', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addCheckConstraint('send_back_needs_comment', sql`action <> 'send-back' or length(trim(comment)) > 0`)
    .execute()

  // ---- film stock ----
  await db.schema.createTable('film')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('program_id', 'integer', (c) => c.notNull().references('program.id'))
    .addColumn('name', 'text', (c) => c.notNull().check(sql`length(trim(name)) > 0`))
    .addColumn('base_polymer', 'text', (c) => c.notNull())
    .addColumn('chlorine_free', 'boolean', (c) => c.notNull())
    .addColumn('colour', 'text', (c) => c.notNull())
    .addColumn('thickness_mm', 'double precision', (c) => c.notNull().check(sql`thickness_mm > 0 and thickness_mm < 10`))
    .addColumn('sheet_width_mm', 'double precision', (c) => c.notNull().check(sql`sheet_width_mm > 0`))
    .addColumn('sheet_height_mm', 'double precision', (c) => c.notNull().check(sql`sheet_height_mm > 0`))
    .addColumn('min_feature_mm', 'double precision', (c) => c.notNull().check(sql`min_feature_mm > 0`))
    .addColumn('laser_power_pct', 'double precision', (c) => c.notNull().check(sql`laser_power_pct > 0 and laser_power_pct <= 100`))
    .addColumn('laser_speed_mm_s', 'double precision', (c) => c.notNull().check(sql`laser_speed_mm_s > 0`))
    .addColumn('laser_passes', 'integer', (c) => c.notNull().check(sql`laser_passes between 1 and 20`))
    .addColumn('retired', 'boolean', (c) => c.notNull().defaultTo(false))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('film_name_unique', ['program_id', 'name'])
    // The target of the chlorine rule's foreign keys below.
    .addUniqueConstraint('film_id_chlorine', ['id', 'chlorine_free'])
    // A film whose polymer names chlorine cannot be declared chlorine-free (PVC is "vinyl").
    .addCheckConstraint('film_polymer_not_chlorinated', sql`not (chlorine_free and base_polymer ~* '(pvc|vinyl chloride|pvdc|vinylidene chloride|chlorin|neoprene|chloroprene)')`)
    .execute()

  // ---- robots, placements, jobs ----
  await db.schema.createTable('robot')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('team_id', 'integer', (c) => c.notNull().references('team.id'))
    .addColumn('name', 'text', (c) => c.notNull().check(sql`length(trim(name)) > 0`))
    .addColumn('season', 'text', (c) => c.notNull())
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addUniqueConstraint('robot_unique', ['team_id', 'name', 'season'])
    .execute()

  // The chlorine rule, held by the database: a placement and a job carry a column that must
  // be true, and a foreign key pairs it with the film's own chlorine_free. A row pointing at
  // film that is not chlorine-free has no partner and is refused, however it is inserted; a
  // film in use cannot be relabelled as chlorinated either (the key would break).
  await db.schema.createTable('placement')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('robot_id', 'integer', (c) => c.notNull().references('robot.id'))
    .addColumn('revision_id', 'integer', (c) => c.notNull().references('revision.id'))
    .addColumn('film_id', 'integer', (c) => c.notNull())
    .addColumn('film_chlorine_free', 'boolean', (c) => c.notNull().defaultTo(true).check(sql`film_chlorine_free`))
    .addColumn('spot', 'text', (c) => c.notNull().check(sql`length(trim(spot)) > 0`))
    .addColumn('width_mm', 'double precision', (c) => c.notNull().check(sql`width_mm > 0`))
    .addColumn('quantity', 'integer', (c) => c.notNull().check(sql`quantity >= 1`))
    .addColumn('spares', 'integer', (c) => c.notNull().defaultTo(0).check(sql`spares >= 0`))
    .addColumn('created_by', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addForeignKeyConstraint('placement_film_chlorine_free', ['film_id', 'film_chlorine_free'], 'film', ['id', 'chlorine_free'])
    .execute()
  // Only approved revisions go on a robot.
  await sql`
    create function placement_needs_approval() returns trigger language plpgsql as $$
    begin
      if not exists (select 1 from revision_status where revision_id = new.revision_id and status = 'approved') then
        raise exception 'revision % is not approved; only approved revisions can be placed', new.revision_id using errcode = 'check_violation';
      end if;
      return new;
    end $$;
  `.execute(db)
  await sql`create trigger placement_approved before insert or update on placement for each row execute function placement_needs_approval()`.execute(db)

  await db.schema.createTable('job')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('placement_id', 'integer', (c) => c.notNull().references('placement.id'))
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('initial', 'reprint')`))
    .addColumn('quantity', 'integer', (c) => c.notNull().check(sql`quantity >= 1`))
    .addColumn('reason', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('film_id', 'integer', (c) => c.notNull())
    .addColumn('film_chlorine_free', 'boolean', (c) => c.notNull().defaultTo(true).check(sql`film_chlorine_free`))
    .addColumn('state', 'text', (c) => c.notNull().defaultTo('queued').check(sql`state in ('queued', 'cut', 'applied')`))
    .addColumn('created_by', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .addColumn('cut_by', 'integer', (c) => c.references('users.id'))
    .addColumn('cut_at', 'timestamptz')
    .addColumn('applied_by', 'integer', (c) => c.references('users.id'))
    .addColumn('applied_at', 'timestamptz')
    .addForeignKeyConstraint('job_film_chlorine_free', ['film_id', 'film_chlorine_free'], 'film', ['id', 'chlorine_free'])
    .execute()
}

export async function down(db: Kysely<any>): Promise<void> {
  for (const t of ['job', 'placement', 'robot', 'film', 'review_event', 'revision_status']) await db.schema.dropTable(t).execute()
  await sql`drop trigger if exists revision_draft on revision`.execute(db)
  for (const f of ['placement_needs_approval', 'approved_is_locked', 'revision_starts_as_draft']) await sql.raw(`drop function if exists ${f}()`).execute(db)
}
