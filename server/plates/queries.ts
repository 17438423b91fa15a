// Reads of rule profiles: a program's own, never another's (404).
import { presetProfile, type RuleProfile } from '../../shared/plates/profiles'
import type { Db } from '../platform/db'

function profiles(db: Db) {
  return db.selectFrom('rule_profile')
    .select(['id', 'program_id as programId', 'name', 'preset_key', 'profile', 'copied_from', 'updated_at'])
}

export type RuleProfileRow = NonNullable<Awaited<ReturnType<ReturnType<typeof profiles>['executeTakeFirst']>>>

export function programProfiles(db: Db, programId: number) {
  return profiles(db).where('program_id', '=', programId).orderBy('name').orderBy('id').execute()
}

/** One of the program's profiles; undefined for another program's or none. */
export function findRuleProfile(db: Db, programId: number, id: number) {
  return profiles(db).where('id', '=', id).where('program_id', '=', programId).executeTakeFirst()
}

/** The profile the program has chosen, if any. */
export async function chosenProfile(db: Db, programId: number): Promise<RuleProfileRow | undefined> {
  const p = await db.selectFrom('program').select('rule_profile_id').where('id', '=', programId).executeTakeFirstOrThrow()
  return p.rule_profile_id ? findRuleProfile(db, programId, p.rule_profile_id) : undefined
}

/** The rules of a row: the shipped preset it follows, or the program's own copy. */
export function resolveProfile(row: Pick<RuleProfileRow, 'preset_key' | 'profile'>): RuleProfile | null {
  return row.preset_key ? presetProfile(row.preset_key) ?? null : row.profile
}
