import { formatHex, parse } from 'culori'
import { sql, type Kysely } from 'kysely'
import { matchPolymer, POLYMERS, polymerByCode, UNKNOWN_POLYMER } from '../../../shared/films/polymers'

// Films from the polymer register instead of a typed name, the film library (colour, opacity,
// kerf, test cuts, stock) and jobs that can be corrected (cancelled, failed and recut).
//
// The chlorine rule is held through the register: the `polymer` table (a copy of
// shared/films/polymers.ts, never edited by the app) refuses a halogen-bearing polymer any
// verdict but 'never'; a film carries its polymer's verdict through a composite foreign key
// that follows the register (ON UPDATE CASCADE); the film's "cleared" is a stored generated
// column — allowed, or ask-the-lab with a recorded approval — and placements and jobs reference
// (film_id, cleared) with a cleared that must be true. Nothing typed by a person decides it.

/** A swatch for a film that only had a colour's name: the first word CSS knows as a colour (CSS Color 4 named colours, through culori). */
export function swatchFromName(name: string): string {
  for (const word of name.toLowerCase().split(/[^a-z]+/)) {
    const c = word ? parse(word) : undefined
    if (c && c.mode === 'rgb') return formatHex(c)
  }
  return '#a3a3a3'
}

export function opacityFromName(name: string): 'opaque' | 'translucent' | 'clear' {
  if (/\b(clear|transparent)\b/i.test(name)) return 'clear'
  if (/\b(translucent|frosted|tinted)\b/i.test(name)) return 'translucent'
  return 'opaque'
}

export async function up(db: Kysely<any>): Promise<void> {
  // ---- the register ----
  await db.schema.createTable('polymer')
    .addColumn('code', 'text', (c) => c.primaryKey().check(sql`code ~ '^[A-Z0-9]+$'`))
    .addColumn('name', 'text', (c) => c.notNull())
    .addColumn('names', sql`text[]`, (c) => c.notNull().defaultTo(sql`'{}'`))
    .addColumn('halogens', sql`text[]`, (c) => c.notNull().defaultTo(sql`'{}'`).check(sql`halogens <@ array['chlorine', 'fluorine']`))
    .addColumn('chlorine_free', 'boolean', (c) => c.generatedAlwaysAs(sql`not ('chlorine' = any(halogens))`).stored())
    .addColumn('verdict', 'text', (c) => c.notNull().check(sql`verdict in ('allowed', 'ask-the-lab', 'never')`))
    .addColumn('why', 'text', (c) => c.notNull())
    .addColumn('sources', 'jsonb', (c) => c.notNull())
    // Chlorine and fluorine: hydrogen chloride and hydrogen fluoride. No approval can clear them.
    .addCheckConstraint('polymer_halogens_never', sql`cardinality(halogens) = 0 or verdict = 'never'`)
    // The target of the film's composite key.
    .addUniqueConstraint('polymer_code_verdict', ['code', 'verdict'])
    .execute()
  await db.insertInto('polymer').values(POLYMERS.map((p) => ({
    code: p.code, name: p.name, names: p.names, halogens: p.halogens, verdict: p.verdict, why: p.why, sources: JSON.stringify(p.sources),
  }))).execute()

  // ---- the film library ----
  await db.schema.alterTable('film')
    .addColumn('polymer_code', 'text')
    .addColumn('polymer_verdict', 'text')
    .addColumn('lab_approved_by', 'integer', (c) => c.references('users.id'))
    .addColumn('lab_approved_at', 'timestamptz')
    .addColumn('lab_approval_sds', 'text')
    .addColumn('colour_hex', 'text')
    .addColumn('opacity', 'text')
    .addColumn('kerf_mm', 'double precision', (c) => c.check(sql`kerf_mm > 0 and kerf_mm < 2`))
    .addColumn('sheets_on_hand', 'integer', (c) => c.notNull().defaultTo(0).check(sql`sheets_on_hand >= 0`))
    .addColumn('retired_reason', 'text')
    .execute()

  // Existing films: the typed polymer read through the register. Nothing recognised, or a
  // polymer that may never be cut: retired, with the reason, and a history line that keeps
  // what was typed.
  const films = await db.selectFrom('film').select(['id', 'program_id', 'name', 'base_polymer', 'colour', 'retired']).orderBy('id').execute()
  for (const f of films) {
    const p = matchPolymer(f.base_polymer) ?? polymerByCode(UNKNOWN_POLYMER)!
    const never = p.verdict === 'never'
    const reason = never
      ? p.code === UNKNOWN_POLYMER
        ? `Its make-up was recorded as “${f.base_polymer}”, which names no polymer in the register. ${p.why}`
        : `Its make-up was recorded as “${f.base_polymer}”, which the register reads as ${p.name}. ${p.why}`
      : null
    await db.updateTable('film').set({
      polymer_code: p.code, polymer_verdict: p.verdict, colour_hex: swatchFromName(f.colour), opacity: opacityFromName(`${f.name} ${f.colour}`),
      ...(never ? { retired: true, retired_reason: reason } : {}),
    }).where('id', '=', f.id).execute()
    await db.insertInto('audit_event').values({
      program_id: f.program_id, actor_id: null, action: 'register-film', subject_type: 'film', subject_id: String(f.id),
      detail: JSON.stringify({ name: f.name, typed: f.base_polymer, polymer: p.code, retired: never && !f.retired, reason }),
    }).execute()
  }

  await db.schema.alterTable('film')
    .alterColumn('polymer_code', (c) => c.setNotNull())
    .alterColumn('polymer_verdict', (c) => c.setNotNull())
    .alterColumn('colour_hex', (c) => c.setNotNull())
    .alterColumn('opacity', (c) => c.setNotNull())
    .execute()
  await db.schema.alterTable('film')
    .addForeignKeyConstraint('film_polymer', ['polymer_code', 'polymer_verdict'], 'polymer', ['code', 'verdict'], (c) => c.onUpdate('cascade'))
    .execute()
  await db.schema.alterTable('film').addCheckConstraint('film_colour_hex', sql`colour_hex ~ '^#[0-9a-f]{6}$'`).execute()
  await db.schema.alterTable('film').addCheckConstraint('film_opacity', sql`opacity in ('opaque', 'translucent', 'clear')`).execute()
  // Who, when and the safety data sheet, all three or none; only a polymer the lab must judge.
  await db.schema.alterTable('film').addCheckConstraint('film_lab_approval_whole', sql`
    (lab_approved_at is null) = (lab_approved_by is null) and (lab_approved_at is null) = (lab_approval_sds is null)
    and (lab_approval_sds is null or length(trim(lab_approval_sds)) > 0)`).execute()
  await db.schema.alterTable('film').addCheckConstraint('film_lab_approval_asked', sql`lab_approved_at is null or polymer_verdict = 'ask-the-lab'`).execute()
  await sql`alter table film add column cleared boolean generated always as
    (polymer_verdict = 'allowed' or (polymer_verdict = 'ask-the-lab' and lab_approved_at is not null)) stored`.execute(db)
  await db.schema.alterTable('film').addUniqueConstraint('film_id_cleared', ['id', 'cleared']).execute()
  // An approval was judged on one polymer: another polymer (or a new verdict from the
  // register) needs a new one.
  await sql`
    create function film_polymer_change_clears_approval() returns trigger language plpgsql as $$
    begin
      if new.polymer_code is distinct from old.polymer_code or new.polymer_verdict is distinct from old.polymer_verdict then
        new.lab_approved_by := null; new.lab_approved_at := null; new.lab_approval_sds := null;
      end if;
      return new;
    end $$;
  `.execute(db)
  await sql`create trigger film_polymer_change before update on film for each row execute function film_polymer_change_clears_approval()`.execute(db)

  // ---- placements and jobs: the key moves from chlorine_free to cleared ----
  for (const t of ['placement', 'job']) {
    await db.schema.alterTable(t).dropConstraint(`${t}_film_chlorine_free`).execute()
    await sql`alter table ${sql.table(t)} rename column film_chlorine_free to film_cleared`.execute(db)
    await sql`alter table ${sql.table(t)} alter column film_cleared drop not null`.execute(db)
  }
  await db.schema.alterTable('film').dropConstraint('film_id_chlorine').execute()
  await db.schema.alterTable('film').dropConstraint('film_polymer_not_chlorinated').execute()
  await db.schema.alterTable('film').dropColumn('chlorine_free').dropColumn('base_polymer').execute()

  // Jobs remember their own width, so editing a placement never changes what a job cuts.
  await db.schema.alterTable('job')
    .addColumn('width_mm', 'double precision')
    .addColumn('recut_of', 'integer', (c) => c.references('job.id'))
    .addColumn('sheets_used', 'integer', (c) => c.check(sql`sheets_used >= 0`))
    .addColumn('applied_count', 'integer', (c) => c.check(sql`applied_count >= 0`))
    .addColumn('cancelled_by', 'integer', (c) => c.references('users.id'))
    .addColumn('cancelled_at', 'timestamptz')
    .addColumn('cancel_reason', 'text')
    .addColumn('failed_by', 'integer', (c) => c.references('users.id'))
    .addColumn('failed_at', 'timestamptz')
    .addColumn('failure', 'text', (c) => c.check(sql`failure in ('burnt', 'lifted', 'mis-weeded', 'other')`))
    .addColumn('failure_note', 'text')
    .execute()
  await sql`update job set width_mm = placement.width_mm from placement where placement.id = job.placement_id`.execute(db)
  await sql`alter table job alter column width_mm set not null`.execute(db)
  await db.schema.alterTable('job').addCheckConstraint('job_width', sql`width_mm > 0`).execute()

  await db.schema.alterTable('placement')
    .addColumn('spares_on_hand', 'integer', (c) => c.notNull().defaultTo(0).check(sql`spares_on_hand >= 0`))
    .addColumn('removed_by', 'integer', (c) => c.references('users.id'))
    .addColumn('removed_at', 'timestamptz')
    .addColumn('removed_reason', 'text')
    .execute()
  await db.schema.alterTable('placement')
    .addCheckConstraint('placement_removal_whole', sql`(removed_at is null) = (removed_by is null) and (removed_at is null) = (removed_reason is null)`)
    .execute()

  await db.schema.alterTable('job').dropConstraint('job_kind_check').execute()
  await db.schema.alterTable('job').addCheckConstraint('job_kind_check', sql`kind in ('initial', 'reprint', 'recut', 'extra')`).execute()
  await db.schema.alterTable('job').dropConstraint('job_state_check').execute()
  await db.schema.alterTable('job').addCheckConstraint('job_state_check', sql`state in ('queued', 'cut', 'applied', 'cancelled', 'failed')`).execute()

  // Rows written before the register on film that cannot clear keep their history with no
  // key (a null cleared); a job of theirs still waiting to be cut is cancelled, saying why.
  await sql`update job set state = 'cancelled', cancelled_at = now(),
      cancel_reason = 'Cancelled when films moved to the polymer register: its film may not be cut. ' || coalesce(film.retired_reason, 'The polymer needs the lab''s approval, recorded on the film''s page, before it is cut; then ask for a reprint.')
    from film where film.id = job.film_id and not film.cleared and job.state = 'queued'`.execute(db)
  for (const t of ['placement', 'job']) {
    await sql`update ${sql.table(t)} set film_cleared = null from film where film.id = ${sql.ref(`${t}.film_id`)} and not film.cleared`.execute(db)
  }

  // Each state with its who and when; cancelled only before a cut; a recut names its failed job.
  await db.schema.alterTable('job').addCheckConstraint('job_states_recorded', sql`
    (state = 'cancelled') = (cancelled_at is not null)
    and (cancelled_at is null or (cut_at is null and length(trim(coalesce(cancel_reason, ''))) > 0))
    and (state = 'failed') = (failed_at is not null)
    and (failed_at is null or failure is not null)
    and (state not in ('cut', 'applied') or cut_at is not null)
    and (state = 'applied') = (applied_at is not null)
    and (applied_count is null or applied_count <= quantity)
    and ((kind = 'recut') = (recut_of is not null))`).execute()
  // Only a job that will never be cut may be without its film's key.
  await db.schema.alterTable('job').addCheckConstraint('job_waiting_needs_cleared_film', sql`film_cleared is not null or state <> 'queued'`).execute()

  for (const t of ['placement', 'job']) {
    await db.schema.alterTable(t)
      .addForeignKeyConstraint(`${t}_film_cleared`, ['film_id', 'film_cleared'], 'film', ['id', 'cleared'])
      .execute()
  }
  // A missing key is history only: no new row may be written without one, and no row may lose it.
  await sql`
    create function film_cleared_is_kept() returns trigger language plpgsql as $$
    begin
      if new.film_cleared is null and (tg_op = 'INSERT' or old.film_cleared is not null or new.film_id is distinct from old.film_id) then
        raise exception '% must reference a film that may be cut (film_cleared = true)', tg_table_name using errcode = 'check_violation';
      end if;
      return new;
    end $$;
  `.execute(db)
  for (const t of ['placement', 'job']) {
    await sql`create trigger ${sql.raw(`${t}_film_cleared_kept`)} before insert or update on ${sql.table(t)} for each row execute function film_cleared_is_kept()`.execute(db)
  }

  // ---- test cuts and stock, each a history of its own ----
  await db.schema.createTable('film_test')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('film_id', 'integer', (c) => c.notNull().references('film.id'))
    .addColumn('tested_by', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('tested_at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    // The grid as cut: power and speed ranges, passes, square size.
    .addColumn('grid', 'jsonb', (c) => c.notNull())
    // The square that weeded cleanly ("C4"), or none.
    .addColumn('square', 'text', (c) => c.check(sql`square ~ '^[A-Z][0-9]{1,2}$'`))
    .addColumn('power_pct', 'double precision', (c) => c.check(sql`power_pct > 0 and power_pct <= 100`))
    .addColumn('speed_mm_s', 'double precision', (c) => c.check(sql`speed_mm_s > 0`))
    .addColumn('passes', 'integer', (c) => c.notNull().check(sql`passes between 1 and 20`))
    .addColumn('kerf_mm', 'double precision', (c) => c.check(sql`kerf_mm > 0 and kerf_mm < 2`))
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addCheckConstraint('film_test_square_settings', sql`(square is null) = (power_pct is null) and (square is null) = (speed_mm_s is null)`)
    .execute()
  await sql`create index film_test_film on film_test (film_id, id)`.execute(db)

  await db.schema.createTable('film_stock_event')
    .addColumn('id', 'serial', (c) => c.primaryKey())
    .addColumn('film_id', 'integer', (c) => c.notNull().references('film.id'))
    .addColumn('kind', 'text', (c) => c.notNull().check(sql`kind in ('delivery', 'count', 'cut', 'failed-cut')`))
    .addColumn('change', 'integer', (c) => c.notNull())
    .addColumn('on_hand', 'integer', (c) => c.notNull().check(sql`on_hand >= 0`))
    .addColumn('job_id', 'integer', (c) => c.references('job.id'))
    .addColumn('note', 'text', (c) => c.notNull().defaultTo(''))
    .addColumn('by_user', 'integer', (c) => c.notNull().references('users.id'))
    .addColumn('at', 'timestamptz', (c) => c.notNull().defaultTo(sql`now()`))
    .execute()
  await sql`create index film_stock_event_film on film_stock_event (film_id, id)`.execute(db)
  await sql`create index job_film_queued on job (film_id, id) where state = 'queued'`.execute(db)
  await sql`create index job_recut_of on job (recut_of) where recut_of is not null`.execute(db)
}

export async function down(db: Kysely<any>): Promise<void> {
  // The older schema cannot hold a placement or job on film that may not be cut.
  const legacy = await sql<{ n: number }>`select (select count(*) from placement where film_cleared is null) + (select count(*) from job where film_cleared is null) as n`.execute(db)
  if (Number(legacy.rows[0]?.n) > 0) throw new Error('Placements or jobs on film that may not be cut exist; the schema before 0008 cannot hold them. Remove them first.')
  for (const index of ['job_recut_of', 'job_film_queued']) await sql`drop index if exists ${sql.raw(index)}`.execute(db)
  await db.schema.dropTable('film_stock_event').execute()
  await db.schema.dropTable('film_test').execute()
  for (const t of ['placement', 'job']) {
    await sql`drop trigger if exists ${sql.raw(`${t}_film_cleared_kept`)} on ${sql.table(t)}`.execute(db)
    await db.schema.alterTable(t).dropConstraint(`${t}_film_cleared`).execute()
  }
  await sql`drop function if exists film_cleared_is_kept()`.execute(db)
  for (const c of ['job_waiting_needs_cleared_film', 'job_states_recorded', 'job_width']) await db.schema.alterTable('job').dropConstraint(c).execute()
  // Cancelled and failed jobs have no place in the older states: they go back as cut.
  await sql`update job set state = 'cut', cut_at = coalesce(cut_at, cancelled_at, failed_at) where state in ('cancelled', 'failed')`.execute(db)
  await sql`update job set kind = 'reprint' where kind in ('recut', 'extra')`.execute(db)
  await db.schema.alterTable('job').dropConstraint('job_state_check').execute()
  await db.schema.alterTable('job').addCheckConstraint('job_state_check', sql`state in ('queued', 'cut', 'applied')`).execute()
  await db.schema.alterTable('job').dropConstraint('job_kind_check').execute()
  await db.schema.alterTable('job').addCheckConstraint('job_kind_check', sql`kind in ('initial', 'reprint')`).execute()
  await db.schema.alterTable('job')
    .dropColumn('width_mm').dropColumn('recut_of').dropColumn('sheets_used').dropColumn('applied_count')
    .dropColumn('cancelled_by').dropColumn('cancelled_at').dropColumn('cancel_reason')
    .dropColumn('failed_by').dropColumn('failed_at').dropColumn('failure').dropColumn('failure_note').execute()
  await db.schema.alterTable('placement').dropConstraint('placement_removal_whole').execute()
  await db.schema.alterTable('placement')
    .dropColumn('spares_on_hand').dropColumn('removed_by').dropColumn('removed_at').dropColumn('removed_reason').execute()

  await db.schema.alterTable('film').addColumn('base_polymer', 'text').addColumn('chlorine_free', 'boolean').execute()
  await sql`update film set base_polymer = polymer.name, chlorine_free = polymer.chlorine_free and film.cleared from polymer where polymer.code = film.polymer_code`.execute(db)
  await sql`alter table film alter column base_polymer set not null, alter column chlorine_free set not null`.execute(db)
  await sql`drop trigger if exists film_polymer_change on film`.execute(db)
  await sql`drop function if exists film_polymer_change_clears_approval()`.execute(db)
  await db.schema.alterTable('film').dropConstraint('film_id_cleared').execute()
  await db.schema.alterTable('film').dropColumn('cleared').execute()
  for (const c of ['film_polymer', 'film_colour_hex', 'film_opacity', 'film_lab_approval_whole', 'film_lab_approval_asked']) await db.schema.alterTable('film').dropConstraint(c).execute()
  await db.schema.alterTable('film')
    .dropColumn('polymer_code').dropColumn('polymer_verdict').dropColumn('lab_approved_by').dropColumn('lab_approved_at').dropColumn('lab_approval_sds')
    .dropColumn('colour_hex').dropColumn('opacity').dropColumn('kerf_mm').dropColumn('sheets_on_hand').dropColumn('retired_reason').execute()
  await db.schema.alterTable('film').addUniqueConstraint('film_id_chlorine', ['id', 'chlorine_free']).execute()
  await db.schema.alterTable('film').addCheckConstraint('film_polymer_not_chlorinated', sql`not (chlorine_free and base_polymer ~* '(pvc|vinyl chloride|pvdc|vinylidene chloride|chlorin|neoprene|chloroprene)')`).execute()
  for (const t of ['placement', 'job']) {
    await sql`update ${sql.table(t)} set film_cleared = true where film_cleared is null`.execute(db)
    await sql`alter table ${sql.table(t)} rename column film_cleared to film_chlorine_free`.execute(db)
    await sql`alter table ${sql.table(t)} alter column film_chlorine_free set not null`.execute(db)
    await db.schema.alterTable(t).addForeignKeyConstraint(`${t}_film_chlorine_free`, ['film_id', 'film_chlorine_free'], 'film', ['id', 'chlorine_free']).execute()
  }
  await db.schema.dropTable('polymer').execute()
}
