// A program's rule profiles: follow a shipped preset, copy one and edit it, choose the one that
// applies. The caller has checked `program.manage` for every change.
import { createError } from 'h3'
import type { z } from 'zod'
import { PRESET_PROFILES, copyProfile, presetProfile, type RuleProfile } from '../../shared/plates/profiles'
import { markChanged } from '../../shared/plates/provenance'
import type { newRuleProfileSchema, ruleProfilePatchSchema } from '../../shared/plates/schemas'
import type { RuleProfilesPage, RuleProfileView } from '../../shared/types/plates'
import { inTransaction, type Db } from '../platform/db'
import { fieldError } from '../platform/http'
import { flags, type Actor } from '../policy'
import { audit, by } from '../history/service'
import { PLATE_FONTS } from './font'
import { findRuleProfile, programProfiles, resolveProfile, type RuleProfileRow } from './queries'

export const plateFontChoices = () => PLATE_FONTS.map((f) => ({ id: f.id, label: `${f.family} ${f.style}`, licence: f.licence }))

export function toProfileView(row: RuleProfileRow): RuleProfileView | null {
  const profile = resolveProfile(row)
  if (!profile) return null
  return { id: row.id, name: row.name, presetKey: row.preset_key, copiedFrom: row.copied_from, editable: row.preset_key === null, profile }
}

export async function ruleProfilesPage(db: Db, actor: Actor): Promise<RuleProfilesPage> {
  const [rows, program] = await Promise.all([
    programProfiles(db, actor.programId),
    db.selectFrom('program').select('rule_profile_id').where('id', '=', actor.programId).executeTakeFirstOrThrow(),
  ])
  return {
    presets: [...PRESET_PROFILES],
    profiles: rows.map(toProfileView).filter((v): v is RuleProfileView => v !== null),
    chosenId: program.rule_profile_id,
    fonts: plateFontChoices(),
    can: flags(actor, ['program.manage']),
  }
}

const presetName = (p: RuleProfile) => `${p.competition} ${p.season}`

/** A copy's key: its own, so a copy never passes for the preset it came from. */
const copyKey = (programId: number) => `p${programId}-${Date.now().toString(36)}${Math.random().toString(36).slice(2, 6)}`

export async function addRuleProfile(db: Db, actor: Actor, input: z.output<typeof newRuleProfileSchema>): Promise<RuleProfileView> {
  return inTransaction(db, async (trx) => {
    let values: { name: string; preset_key: string | null; profile: string | null; copied_from: string | null }
    if ('presetKey' in input) {
      const preset = presetProfile(input.presetKey)
      if (!preset) throw fieldError(400, 'Please check the form: choose one of the shipped presets.', 'presetKey', 'No such preset.')
      if (!input.copy) {
        // Following a preset: one row per preset, found again if the program has it already.
        const had = await trx.selectFrom('rule_profile').select('id').where('program_id', '=', actor.programId).where('preset_key', '=', preset.key).executeTakeFirst()
        if (had) return toProfileView((await findRuleProfile(trx, actor.programId, had.id))!)!
      }
      values = input.copy
        ? { name: input.name ?? `${presetName(preset)} (our copy)`, preset_key: null, profile: JSON.stringify(copyProfile(preset, copyKey(actor.programId))), copied_from: presetName(preset) }
        : { name: input.name ?? presetName(preset), preset_key: preset.key, profile: null, copied_from: null }
    } else {
      const from = await findRuleProfile(trx, actor.programId, input.copyOf)
      const rules = from && resolveProfile(from)
      if (!from || !rules) throw fieldError(400, 'Please check the form: choose one of the program\'s profiles to copy.', 'copyOf', 'No such profile.')
      values = { name: input.name ?? `${from.name} (copy)`, preset_key: null, profile: JSON.stringify(copyProfile(rules, copyKey(actor.programId))), copied_from: from.name }
    }
    const row = await trx.insertInto('rule_profile').values({ program_id: actor.programId, created_by: actor.id, ...values }).returning('id').executeTakeFirstOrThrow()
    await audit(trx, { ...by(actor), action: 'add-rule-profile', subject: 'program', subjectId: actor.programId, detail: { name: values.name, from: values.copied_from ?? values.preset_key } })
    return toProfileView((await findRuleProfile(trx, actor.programId, row.id))!)!
  })
}

export async function editRuleProfile(db: Db, actor: Actor, row: RuleProfileRow, patch: z.output<typeof ruleProfilePatchSchema>): Promise<RuleProfileView> {
  if (row.preset_key || !row.profile) {
    throw createError({ statusCode: 409, message: 'This profile follows a shipped preset and cannot be edited: make a copy and edit that.' })
  }
  const before = row.profile
  // The copy keeps its own key whatever the form sent.
  const profile = patch.profile ? markChanged(before, { ...patch.profile, key: before.key }) : before
  const name = patch.name ?? row.name
  return inTransaction(db, async (trx) => {
    await trx.updateTable('rule_profile').set({ name, profile: JSON.stringify(profile), updated_at: new Date() })
      .where('id', '=', row.id).where('program_id', '=', actor.programId).execute()
    await audit(trx, { ...by(actor), action: 'edit-rule-profile', subject: 'program', subjectId: actor.programId, detail: { name } })
    return toProfileView((await findRuleProfile(trx, actor.programId, row.id))!)!
  })
}

export async function chooseRuleProfile(db: Db, actor: Actor, id: number | null): Promise<RuleProfilesPage> {
  await inTransaction(db, async (trx) => {
    const row = id === null ? null : await findRuleProfile(trx, actor.programId, id)
    if (id !== null && !row) throw fieldError(400, 'Please check the form: choose one of the program\'s profiles.', 'ruleProfileId', 'No such profile.')
    await trx.updateTable('program').set({ rule_profile_id: id }).where('id', '=', actor.programId).execute()
    await audit(trx, { ...by(actor), action: 'choose-rule-profile', subject: 'program', subjectId: actor.programId, detail: { name: row?.name ?? null } })
  })
  return ruleProfilesPage(db, actor)
}
