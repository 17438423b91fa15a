// Request bodies, validated by the server and reused by the forms.
import { z } from 'zod'
import { MEMBER_ROLES, ROLES } from '../types/roles'

export const PASSWORD_MIN = 10

export const emailSchema = z.string().trim().toLowerCase().max(254)
  .pipe(z.email({ message: 'Enter an e-mail address such as name@example.org.' }))
export const passwordSchema = z.string()
  .min(PASSWORD_MIN, { message: `Use at least ${PASSWORD_MIN} characters.` })
  .max(200, { message: 'Use at most 200 characters.' })
export const personNameSchema = z.string().trim().min(1, { message: 'Enter a name.' }).max(120)

export const signInSchema = z.object({
  email: z.string().trim().toLowerCase().min(1, { message: 'Enter your e-mail address.' }).max(254),
  password: z.string().min(1, { message: 'Enter your password.' }).max(200),
})

export const teamSchema = z.object({
  name: z.string().trim().min(1, { message: 'Enter a team name.' }).max(80),
  number: z.string().trim().max(12).optional().nullable().transform((v) => (v ? v : null)),
  colour: z.string().regex(/^#[0-9a-fA-F]{6}$/, { message: 'Pick a colour.' }).default('#0f6e6a'),
})
export const teamPatchSchema = teamSchema.partial()

export const invitationSchema = z.object({
  email: emailSchema,
  name: personNameSchema,
  role: z.enum(ROLES, { message: 'Choose a role.' }),
  teamId: z.number().int().positive().optional().nullable(),
}).superRefine((v, ctx) => {
  if (v.role !== 'mentor' && !v.teamId) ctx.addIssue({ code: 'custom', path: ['teamId'], message: 'Choose the team this person joins.' })
})

export const acceptInvitationSchema = z.object({
  password: passwordSchema,
  name: personNameSchema.optional(),
})

export const resetRequestSchema = z.object({ email: emailSchema })
export const resetSchema = z.object({ password: passwordSchema })

export const membershipSchema = z.object({ role: z.enum(MEMBER_ROLES, { message: 'Choose a role.' }) })

export const personPatchSchema = z.object({
  name: personNameSchema.optional(),
  active: z.boolean().optional(),
  mentor: z.boolean().optional(),
})
