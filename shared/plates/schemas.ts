// Request bodies of the rule profiles and the plate generator.
import { z } from 'zod'
import { PLATE_COLOURS, ruleProfileSchema } from './profiles'

const nameSchema = z.string().trim().min(1, { message: 'Give the profile a name.' }).max(120)

/** A program's profile: following a shipped preset, or an editable copy of a preset or of one of its profiles. */
export const newRuleProfileSchema = z.union([
  z.object({ presetKey: z.string().min(1).max(64), copy: z.boolean().default(false), name: nameSchema.optional() }).strict(),
  z.object({ copyOf: z.number().int().positive(), name: nameSchema.optional() }).strict(),
], { message: 'Choose a preset or one of the program\'s profiles.' })

/** A change to an editable copy: its name, and every field of the profile. */
export const ruleProfilePatchSchema = z.object({
  name: nameSchema.optional(),
  profile: ruleProfileSchema.optional(),
}).refine((v) => v.name !== undefined || v.profile !== undefined, { message: 'Change at least one thing.' })

export const chooseRuleProfileSchema = z.object({
  ruleProfileId: z.number({ message: 'Choose a profile.' }).int().positive().nullable(),
})

const colour = z.enum(PLATE_COLOURS)

export const plateRequestSchema = z.object({
  /** Default: the profile the program has chosen. */
  profileId: z.number().int().positive().optional(),
  /** Default: the team's own number. */
  teamNumber: z.string().trim().max(10).optional(),
  fontId: z.string().max(64).optional(),
  numeralHeightMm: z.number({ message: 'Give a height in mm.' }).positive({ message: 'Give a height in mm.' }).max(1000).optional(),
  marginMm: z.number().min(0).max(200).optional(),
  numeralColour: colour.optional(),
  backgroundColour: colour.optional(),
})
