// A program with its people and things, built straight in the database: for service tests
// (inside their rolled-back transaction) and API tests (committed) alike. Every name is invented.
import { sql, type Kysely } from 'kysely'
import type { Database } from '../../server/db/schema'
import type { MemberRole } from '../../shared/types/roles'
import type { Measurements } from '../../shared/types/pipeline'
import { DEFAULT_SETTINGS } from '../../shared/utils/settings'
import { polymerByCode } from '../../shared/films/polymers'

type Db = Kysely<Database>
let serial = 0
const unique = (tag: string) => `${tag}-${process.pid}-${Date.now().toString(36)}-${serial++}`

export interface TeamFixture { id: number; name: string; student: number; designer: number; operator: number }
export interface ProgramFixture {
  id: number
  mentor: number
  teams: [TeamFixture, TeamFixture]
  films: { pet: number; pvc: number; pu: number }
  emails: Map<number, string>
}

async function person(db: Db, programId: number, name: string, emails: Map<number, string>, passwordHash: string | null) {
  const email = `${unique(name.toLowerCase().replace(/\W+/g, '.'))}@fixtures.example`
  const u = await db.insertInto('users').values({ program_id: programId, email, name, password_hash: passwordHash }).returning('id').executeTakeFirstOrThrow()
  emails.set(u.id, email)
  return u.id
}

/** A film of the register's polymer `polymer`, its verdict carried along as the database asks. */
export async function addFilm(db: Db, programId: number, o: { name: string; polymer: string; opacity?: 'opaque' | 'translucent' | 'clear'; colourHex?: string; sheetsOnHand?: number }) {
  return (await db.insertInto('film').values({
    program_id: programId, name: o.name, polymer_code: o.polymer, polymer_verdict: polymerByCode(o.polymer)?.verdict ?? 'never',
    colour: 'black', colour_hex: o.colourHex ?? '#111111', opacity: o.opacity ?? 'opaque', thickness_mm: 0.08,
    sheet_width_mm: 300, sheet_height_mm: 200, min_feature_mm: 0.8, kerf_mm: null, laser_power_pct: 50, laser_speed_mm_s: 10, laser_passes: 1,
    sheets_on_hand: o.sheetsOnHand ?? 20,
  }).returning('id').executeTakeFirstOrThrow()).id
}

/**
 * A film as the schema before the register (migration 0008) held it: a typed polymer and a
 * declared chlorine-free, for tests of the migrations.
 */
export async function addTypedFilm(db: Db, programId: number, name: string, typed: string, chlorineFree = !/pvc/i.test(typed)) {
  const r = await sql<{ id: number }>`insert into film (program_id, name, base_polymer, chlorine_free, colour, thickness_mm, sheet_width_mm, sheet_height_mm, min_feature_mm, laser_power_pct, laser_speed_mm_s, laser_passes)
    values (${programId}, ${name}, ${typed}, ${chlorineFree}, 'black', 0.08, 300, 200, 0.8, 50, 10, 1) returning id`.execute(db)
  return r.rows[0]!.id
}

/** A program with a mentor, two teams (each with a student, a designer and an operator) and three films: PET, PVC and polyurethane (ask the lab, not approved). */
export async function buildProgram(db: Db, o: { passwordHash?: string; typedFilms?: boolean } = {}): Promise<ProgramFixture> {
  const hash = o.passwordHash ?? null
  const emails = new Map<number, string>()
  const program = await db.insertInto('program').values({ name: unique('Fixture program'), school: 'Fixture school' }).returning('id').executeTakeFirstOrThrow()
  const mentor = await person(db, program.id, 'Fixture Mentor', emails, hash)
  await db.insertInto('mentorship').values({ user_id: mentor, program_id: program.id }).execute()
  const teams: TeamFixture[] = []
  for (const letter of ['A', 'B']) {
    const name = unique(`Team ${letter}`)
    const team = await db.insertInto('team').values({ program_id: program.id, name, colour: '#336699' }).returning('id').executeTakeFirstOrThrow()
    const member = async (role: MemberRole) => {
      const id = await person(db, program.id, `${letter} ${role}`, emails, hash)
      await db.insertInto('membership').values({ user_id: id, team_id: team.id, role }).execute()
      return id
    }
    teams.push({ id: team.id, name, student: await member('student'), designer: await member('designer'), operator: await member('operator') })
  }
  const film = o.typedFilms ? (name: string, polymer: string) => addTypedFilm(db, program.id, name, polymer) : (name: string, polymer: string) => addFilm(db, program.id, { name, polymer })
  const pet = await film('Fixture PET film', 'PET')
  const pvc = await film('Fixture PVC film', 'PVC')
  const pu = await film('Fixture PVC-free vinyl', 'PU')
  return { id: program.id, mentor, teams: teams as [TeamFixture, TeamFixture], films: { pet, pvc, pu }, emails }
}

export const FIXTURE_MEASUREMENTS: Measurements = {
  widthMm: 60, heightMm: 40, inkAreaMm2: 900, cutLengthMm: 400, pieces: 2, holes: 1, nodes: 40, narrowestFeatureMm: 3,
  smallPieces: 0, smallPieceLimitMm2: 0.5, fidelity: 0.99, threshold: 128, pxPerMm: 10, preparedWidthPx: 600, preparedHeightPx: 400,
}

/** An artwork with one revision (its files named but not stored), optionally submitted or approved. */
export async function addArtwork(db: Db, o: { teamId: number; authorId: number; title?: string; status?: 'draft' | 'in-review' | 'approved'; vectorKey?: string; widthMm?: number; heightMm?: number; layers?: { name: string; hex: string }[] }) {
  const artwork = await db.insertInto('artwork').values({ team_id: o.teamId, title: o.title ?? unique('Fixture artwork'), author_id: o.authorId }).returning(['id', 'title']).executeTakeFirstOrThrow()
  const hash = 'f'.repeat(64)
  const source = await db.insertInto('source').values({
    artwork_id: artwork.id, object_key: `sources/${hash}`, content_hash: hash, media_type: 'image/png', file_name: 'fixture.png',
    width_px: 600, height_px: 400, bytes: 1000, uploaded_by: o.authorId,
  }).returning('id').executeTakeFirstOrThrow()
  const revision = await db.insertInto('revision').values({
    artwork_id: artwork.id, number: 1, source_id: source.id, settings: JSON.stringify(DEFAULT_SETTINGS), width_mm: o.widthMm ?? 60, height_mm: o.heightMm ?? 40,
    prepared_key: 'prepared/fixture.png', outline_key: 'outline/fixture.svg', vector_key: o.vectorKey ?? 'vector/fixture.svg',
    measurements: JSON.stringify(FIXTURE_MEASUREMENTS), timings: JSON.stringify({ prepareMs: 1, traceMs: 1, cleanMs: 1, measureMs: 1, totalMs: 4 }),
    engine_versions: JSON.stringify({ sharp: 'x', vips: 'x', potrace: 'x', svgo: 'x' }), author_id: o.authorId,
    ...(o.layers ? {
      layer_count: o.layers.length,
      colour: JSON.stringify({ sentence: `${o.layers.length} inks`, inks: o.layers.map((l) => ({ ...l, share: 0.1 })), stack: o.layers.map(() => ({ mode: 'under', overlapMm: 0.5 })), marks: true }),
    } : {}),
  }).returning('id').executeTakeFirstOrThrow()
  for (const [position, layer] of (o.layers ?? []).entries()) {
    const { threshold: _threshold, ...measurements } = FIXTURE_MEASUREMENTS
    await db.insertInto('revision_layer').values({
      revision_id: revision.id, position, name: layer.name, hex: layer.hex,
      prepared_key: `prepared/fixture-${position}.png`, outline_key: `outline/fixture-${position}.svg`, vector_key: `vector/fixture-${position}.svg`,
      measurements: JSON.stringify(measurements),
    }).execute()
  }
  for (const status of o.status === 'approved' ? ['in-review', 'approved'] as const : o.status === 'in-review' ? ['in-review'] as const : []) {
    await db.updateTable('revision_status').set({ status, updated_at: sql`clock_timestamp()` }).where('revision_id', '=', revision.id).execute()
    await db.updateTable('artwork').set({ status }).where('id', '=', artwork.id).execute()
  }
  return { id: artwork.id, title: artwork.title, revisionId: revision.id }
}

export async function addRobot(db: Db, teamId: number, name = unique('Fixture robot')) {
  return (await db.insertInto('robot').values({ team_id: teamId, name, season: '2026–27' }).returning('id').executeTakeFirstOrThrow()).id
}
