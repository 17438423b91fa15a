// A fictional program for the demo and the tests. Every name here is invented; team
// numbers use our own "HL-" prefix so they cannot be mistaken for a real team's number.
import type { Kysely } from 'kysely'
import type { Database } from './schema'
import { hashPassword } from '../platform/passwords'
import { polymerByCode } from '../../shared/films/polymers'

export const DEMO_PASSWORD = 'workshop-demo-2026'

export const DEMO_ACCOUNTS = {
  mentor: { email: 'mentor@harbourline.example', name: 'Odile Marchetti' },
  designer: { email: 'designer@harbourline.example', name: 'Kofi Lindqvist' },
  student: { email: 'student@harbourline.example', name: 'Priya Castellanos' },
  operator: { email: 'operator@harbourline.example', name: 'Bram Okonkwo-Hale' },
} as const

// Each film chooses its polymer from the register (shared/films/polymers.ts); its verdict comes
// along. Laser settings here are invented for the demo; a lab finds its own by test cuts.
export const DEMO_FILMS = [
  { name: 'Matte black polyester film', polymer_code: 'PET', colour: 'matte black', colour_hex: '#1f1f1f', opacity: 'opaque', thickness_mm: 0.08, sheet_width_mm: 300, sheet_height_mm: 200, min_feature_mm: 0.8, kerf_mm: 0.12, laser_power_pct: 55, laser_speed_mm_s: 12, laser_passes: 1, sheets_on_hand: 14 },
  // Blue and untested: the placement form and the job page say why it may not cut.
  { name: 'Deep blue polyester film', polymer_code: 'PET', colour: 'deep blue', colour_hex: '#1d3f8f', opacity: 'opaque', thickness_mm: 0.08, sheet_width_mm: 300, sheet_height_mm: 200, min_feature_mm: 0.8, kerf_mm: null, laser_power_pct: 65, laser_speed_mm_s: 10, laser_passes: 1, sheets_on_hand: 3 },
  { name: 'Birch veneer sticker sheet', polymer_code: 'WOOD', colour: 'natural birch', colour_hex: '#d9bf8c', opacity: 'opaque', thickness_mm: 0.6, sheet_width_mm: 280, sheet_height_mm: 190, min_feature_mm: 1.5, kerf_mm: null, laser_power_pct: 100, laser_speed_mm_s: 4, laser_passes: 2, sheets_on_hand: 6 },
  // Polyurethane: the lab must approve it for this film first (it gives off hydrogen cyanide when burnt).
  { name: 'Satin red PVC-free film', polymer_code: 'PU', colour: 'satin red', colour_hex: '#b3262e', opacity: 'opaque', thickness_mm: 0.09, sheet_width_mm: 300, sheet_height_mm: 200, min_feature_mm: 1, kerf_mm: null, laser_power_pct: 45, laser_speed_mm_s: 12, laser_passes: 1, sheets_on_hand: 5 },
  // In the stock so people see why it cannot be chosen: PVC gives off hydrogen chloride when lasered.
  { name: 'Glossy white sign vinyl', polymer_code: 'PVC', colour: 'glossy white', colour_hex: '#f7f7f5', opacity: 'opaque', thickness_mm: 0.1, sheet_width_mm: 300, sheet_height_mm: 300, min_feature_mm: 0.6, kerf_mm: null, laser_power_pct: 1, laser_speed_mm_s: 1, laser_passes: 1, sheets_on_hand: 0 },
] as const

/** Loads the demo program into an empty database; does nothing when any program exists. */
export async function loadDemo(db: Kysely<Database>): Promise<boolean> {
  const any = await db.selectFrom('program').select('id').limit(1).executeTakeFirst()
  if (any) return false
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  await db.transaction().execute(async (trx) => {
    const program = await trx.insertInto('program')
      .values({ name: 'Harbourline Robotics', school: 'Kestrel Bay Secondary School', laser_work_width_mm: 400, laser_work_height_mm: 400 })
      .returning('id').executeTakeFirstOrThrow()
    const teams = await trx.insertInto('team').values([
      { program_id: program.id, name: 'Copper Wrens', number: 'HL-1', colour: '#b4532a' },
      { program_id: program.id, name: 'Tidewater Sprockets', number: 'HL-2', colour: '#2a5fb4' },
    ]).returning(['id', 'name']).execute()
    const [wrens, sprockets] = teams as unknown as [{ id: number }, { id: number }]
    const people = [
      { ...DEMO_ACCOUNTS.mentor, mentor: true },
      { ...DEMO_ACCOUNTS.designer, team: wrens.id, role: 'designer' as const },
      { ...DEMO_ACCOUNTS.student, team: wrens.id, role: 'student' as const },
      { ...DEMO_ACCOUNTS.operator, team: wrens.id, role: 'operator' as const },
      { email: 'mentor2@harbourline.example', name: 'Hamish Delacroix-Ueda', mentor: true },
      { email: 'juniper@harbourline.example', name: 'Juniper Ashgrove', team: sprockets.id, role: 'designer' as const },
      { email: 'tomasz@harbourline.example', name: 'Tomasz Ferreira-Noor', team: sprockets.id, role: 'student' as const },
      { email: 'wren.op@harbourline.example', name: 'Ilse Moreau-Tan', team: sprockets.id, role: 'operator' as const },
    ]
    for (const p of people) {
      const user = await trx.insertInto('users')
        .values({ program_id: program.id, email: p.email, name: p.name, password_hash: passwordHash })
        .returning('id').executeTakeFirstOrThrow()
      if ('mentor' in p) await trx.insertInto('mentorship').values({ user_id: user.id, program_id: program.id }).execute()
      else await trx.insertInto('membership').values({ user_id: user.id, team_id: p.team, role: p.role }).execute()
    }
    await trx.insertInto('film').values(DEMO_FILMS.map((f) => ({ program_id: program.id, ...f, polymer_verdict: polymerByCode(f.polymer_code)!.verdict }))).execute()
    await trx.insertInto('audit_event').values({
      program_id: program.id, actor_id: null, action: 'load-demo', subject_type: 'program', subject_id: String(program.id), detail: JSON.stringify({}),
    }).execute()
  })
  return true
}
