import { sql, type Kysely } from 'kysely'

// Colour layers: one drawing, several films, cut and stacked in register.
// - revision.layer_count: 1 for a one-colour revision (as before); 2–6 for a layered one, whose
//   vector_key is the stacked clean vector (one group per layer, bottom first, in mm) and whose
//   layers are rows of revision_layer. revision.colour keeps the separation as asked and found
//   (choices, stack order and overlap, marks, the sentence saying what was found).
// - revision_layer: one ink of a layered revision, bottom first: its name and colour, its
//   prepared bitmap and raw outline (none for a generated revision), its clean vector as cut
//   (stacked, with the registration marks, on the canvas every layer shares) and measurements.
//   Immutable like the revision.
// - placement_layer_film: the film each layer of a layered placement is cut in, keyed to the
//   film's `cleared` like placements and jobs, so no layer goes to a film that may not be cut.
//   placement.film_id stays the bottom layer's film.
// - job_order: the jobs queued together for one layered placement or reprint, one per layer;
//   job.layer says which layer a job cuts. A job of a layered revision must name its layer, and
//   a job of a one-colour revision must not.
export async function up(db: Kysely<any>): Promise<void> {
  await db.schema.alterTable('revision')
    .addColumn('layer_count', 'integer', (c) => c.notNull().defaultTo(1).check(sql`layer_count between 1 and 6`))
    .addColumn('colour', 'jsonb')
    .execute()

  await db.schema.createTable('revision_layer')
    .addColumn('revision_id', 'integer', (c) => c.notNull().references('revision.id').onDelete('cascade'))
    .addColumn('position', 'integer', (c) => c.notNull().check(sql`position between 0 and 5`))
    .addColumn('name', 'text', (c) => c.notNull().check(sql`length(trim(name)) between 1 and 60`))
    .addColumn('hex', 'text', (c) => c.notNull().check(sql`hex ~ '^#[0-9a-f]{6}$'`))
    .addColumn('prepared_key', 'text')
    .addColumn('outline_key', 'text')
    .addColumn('vector_key', 'text', (c) => c.notNull())
    .addColumn('measurements', 'jsonb', (c) => c.notNull())
    .addPrimaryKeyConstraint('revision_layer_pk', ['revision_id', 'position'])
    .addCheckConstraint('revision_layer_files', sql`(prepared_key is null) = (outline_key is null)`)
    .execute()
  await sql`
    create function revision_layer_is_immutable() returns trigger language plpgsql as $$
    begin
      raise exception 'layer % of revision % is immutable; make a new revision instead', old.position, old.revision_id using errcode = 'check_violation';
    end $$;
  `.execute(db)
  await sql`create trigger revision_layer_immutable before update on revision_layer for each row execute function revision_layer_is_immutable()`.execute(db)

  await db.schema.createTable('placement_layer_film')
    .addColumn('placement_id', 'integer', (c) => c.notNull().references('placement.id').onDelete('cascade'))
    .addColumn('position', 'integer', (c) => c.notNull().check(sql`position between 0 and 5`))
    .addColumn('film_id', 'integer', (c) => c.notNull())
    .addColumn('film_cleared', 'boolean', (c) => c.defaultTo(true))
    .addPrimaryKeyConstraint('placement_layer_film_pk', ['placement_id', 'position'])
    .addForeignKeyConstraint('placement_layer_film_cleared', ['film_id', 'film_cleared'], 'film', ['id', 'cleared'])
    .execute()
  await sql`create trigger placement_layer_film_cleared_kept before insert or update on placement_layer_film for each row execute function film_cleared_is_kept()`.execute(db)

  await db.schema.createTable('job_order')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('placement_id', 'integer', (c) => c.notNull().references('placement.id'))
    .addColumn('created_by', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('created_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await db.schema.alterTable('job')
    .addColumn('layer', 'integer', (c) => c.check(sql`layer between 0 and 5`))
    .addColumn('order_id', 'integer', (c) => c.references('job_order.id'))
    .execute()
  await db.schema.alterTable('job').addCheckConstraint('job_layer_in_order', sql`(layer is null) = (order_id is null)`).execute()
  await sql`create index job_order_jobs on job (order_id) where order_id is not null`.execute(db)
  await sql`
    create function job_layer_matches_revision() returns trigger language plpgsql as $$
    declare
      layers integer;
    begin
      select r.layer_count into layers from placement p join revision r on r.id = p.revision_id where p.id = new.placement_id;
      if new.layer is null and layers > 1 then
        raise exception 'a job of a layered revision names the layer it cuts' using errcode = 'check_violation', constraint = 'job_layer_of_revision';
      end if;
      if new.layer is not null and (layers is null or layers = 1 or new.layer >= layers) then
        raise exception 'job layer % is not a layer of its revision', new.layer using errcode = 'check_violation', constraint = 'job_layer_of_revision';
      end if;
      return new;
    end $$;
  `.execute(db)
  await sql`create trigger job_layer_of_revision before insert or update of layer, placement_id on job for each row execute function job_layer_matches_revision()`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  await sql`drop trigger job_layer_of_revision on job`.execute(db)
  await sql`drop function job_layer_matches_revision()`.execute(db)
  await sql`drop index job_order_jobs`.execute(db)
  await db.schema.alterTable('job').dropConstraint('job_layer_in_order').execute()
  await db.schema.alterTable('job').dropColumn('order_id').dropColumn('layer').execute()
  await db.schema.dropTable('job_order').execute()
  await db.schema.dropTable('placement_layer_film').execute()
  await db.schema.dropTable('revision_layer').execute()
  await sql`drop function revision_layer_is_immutable()`.execute(db)
  await sql`delete from revision where layer_count > 1`.execute(db)
  await db.schema.alterTable('revision').dropColumn('colour').dropColumn('layer_count').execute()
}
