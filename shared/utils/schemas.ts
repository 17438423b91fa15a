// Request bodies, validated by the server and reused by the forms.
import { z } from 'zod'
import { colourSettingsSchema } from './colour-settings'
import { CUT_SHEET_LIMITS, WEEDING_LINE_LIMITS } from '../constants/cut-sheet'
import { PLACEMENT_LIMITS } from '../constants/placements'
import { MAX_LAYERS } from '../types/layers'
import { MEMBER_ROLES, ROLES } from '../types/roles'
import { CUT_FAILURES, JOB_STATES } from '../types/robots'
import { AUDIT_KINDS } from '../types/audit'
import { polymerByCode } from '../films/polymers'
import { OPACITIES } from '../films/library'
import { ROBOT_SIDES } from '../plates/profiles'

export const PASSWORD_MIN = 10

/** A number as people type it: decimal digits with an optional sign and fraction. */
const PLAIN_DECIMAL = /^-?(\d+(\.\d*)?|\.\d+)$/

/**
 * A number read from a form field or a query string, where everything arrives as text. Only a
 * plain decimal is a number ("12", "12.5", " 12 "): "0x10", "1e2", "12abc" and a blank are
 * handed on as they are, so `schema` refuses them with its own message (JavaScript's Number()
 * would read them as 16, 100, NaN and 0). Missing or empty stays undefined, for defaults.
 */
export function formNumber<S extends z.ZodType>(schema: S) {
  return z.preprocess((v) => {
    if (typeof v !== 'string') return v
    if (v === '') return undefined
    const t = v.trim()
    return PLAIN_DECIMAL.test(t) ? Number(t) : v
  }, schema)
}

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

const teamFields = {
  name: z.string().trim().min(1, { message: 'Enter a team name.' }).max(80),
  number: z.string().trim().max(12).optional().nullable().transform((v) => (v ? v : null)),
  colour: z.string().regex(/^#[0-9a-fA-F]{6}$/, { message: 'Pick a colour.' }),
}
export const teamSchema = z.object({ ...teamFields, colour: teamFields.colour.default('#0f6e6a') })
// No defaults here: a field left out of a change stays as it is.
export const teamPatchSchema = z.object({
  name: teamFields.name.optional(),
  number: z.string().trim().max(12).nullable().optional().transform((v) => (v === undefined ? undefined : v || null)),
  colour: teamFields.colour.optional(),
})

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

/** Physical width of a decal: from a small label to the largest film sheet a lab laser takes. */
export const WIDTH_MM_MIN = 5
export const WIDTH_MM_MAX = 1000
export const widthMmSchema = z.number({ message: 'Enter the width in millimetres.' })
  .min(WIDTH_MM_MIN, { message: `At least ${WIDTH_MM_MIN} mm.` })
  .max(WIDTH_MM_MAX, { message: `At most ${WIDTH_MM_MAX} mm.` })

export const artworkFieldsSchema = z.object({
  title: z.string().trim().min(1, { message: 'Give the artwork a title.' }).max(120, { message: 'Use at most 120 characters.' }),
  teamId: formNumber(z.number({ message: 'Choose a team.' }).int().positive({ message: 'Choose a team.' })),
  widthMm: formNumber(widthMmSchema.default(150)),
})

/** A page of a list: `cursor` from the previous page's `nextCursor`, up to `limit` items. */
function pageQuery(defaultLimit: number) {
  return {
    cursor: z.string().max(500).optional(),
    limit: formNumber(z.number().int().min(1).max(100).default(defaultLimit)),
  }
}
const optionalId = formNumber(z.number().int().positive().optional())

export const artworkListQuerySchema = z.object({
  teamId: optionalId,
  q: z.string().trim().max(120).optional(),
  ...pageQuery(20),
})

export const robotListQuerySchema = z.object({ teamId: optionalId, ...pageQuery(50) })
export const reviewQueueQuerySchema = z.object({ ...pageQuery(50) })
const isoDay = z.string().regex(/^\d{4}-\d{2}-\d{2}$/, { message: 'A date as YYYY-MM-DD.' }).optional()

/** The activity, filtered by who, what kind, which team and which days (UTC, from and to both included). */
export const auditQuerySchema = z.object({
  actorId: optionalId,
  kind: z.enum(AUDIT_KINDS).optional(),
  teamId: optionalId,
  from: isoDay,
  to: isoDay,
  ...pageQuery(50),
})
export type AuditQuery = z.infer<typeof auditQuerySchema>

export const revisionRequestSchema = z.object({
  // Checked in full by the pipeline's own settings schema (shared/utils/settings.ts).
  settings: z.record(z.string(), z.unknown()).default({}),
  widthMm: widthMmSchema,
  /** The colour layers as the designer set them on the bench; absent: found and decided automatically. */
  colour: colourSettingsSchema.optional(),
})

export const reviewSchema = z.object({
  decision: z.enum(['approve', 'send-back'], { message: 'Choose approve or send back.' }),
  comment: z.string().trim().max(2000).default(''),
}).superRefine((v, ctx) => {
  if (v.decision === 'send-back' && !v.comment) ctx.addIssue({ code: 'custom', path: ['comment'], message: 'Say what to change when sending it back.' })
})

/** A register code the films form chose; a polymer that may never be cut is refused with the register's reason. */
export const polymerCodeSchema = z.string({ message: 'Choose what the film is made of from the register.' }).trim().max(20)
  .superRefine((code, ctx) => {
    const p = polymerByCode(code)
    if (!p) ctx.addIssue({ code: 'custom', message: 'Choose what the film is made of from the register: search it by any common name.' })
    else if (p.verdict === 'never') ctx.addIssue({ code: 'custom', message: `${p.name} can never be placed or cut. ${p.why}` })
  })

const filmFields = {
  name: z.string().trim().min(1, { message: 'Name the film.' }).max(80),
  polymerCode: polymerCodeSchema,
  colour: z.string().trim().min(1, { message: 'Name the colour.' }).max(40),
  colourHex: z.string().regex(/^#[0-9a-fA-F]{6}$/, { message: 'Pick the swatch colour.' }).transform((v) => v.toLowerCase()),
  opacity: z.enum(OPACITIES, { message: 'Say whether the film is opaque, translucent or clear.' }),
  thicknessMm: z.number({ message: 'Enter the thickness in mm.' }).gt(0).lt(10),
  sheetWidthMm: z.number({ message: 'Enter the sheet width in mm.' }).gt(0).max(2000),
  sheetHeightMm: z.number({ message: 'Enter the sheet height in mm.' }).gt(0).max(2000),
  minFeatureMm: z.number({ message: 'Enter the smallest weedable feature in mm.' }).gt(0).max(50),
  /** Null: not measured yet (the common-practice default applies). */
  kerfMm: z.number({ message: 'Enter the kerf in mm (0: no compensation), or leave it empty.' }).min(0).lt(2).nullable(),
  laserPowerPct: z.number({ message: 'Enter the power in %.' }).gt(0).max(100),
  laserSpeedMmS: z.number({ message: 'Enter the speed in mm/s.' }).gt(0).max(1000),
  laserPasses: z.number({ message: 'Enter the number of passes.' }).int().min(1).max(20),
}
export const filmSchema = z.object({
  ...filmFields,
  kerfMm: filmFields.kerfMm.default(null),
  sheetsOnHand: z.number({ message: 'How many sheets are on the shelf?' }).int().min(0).max(100_000).default(0),
  retired: z.boolean().default(false),
})
// No defaults: a field left out of a change stays as it is. Stock goes through deliveries and counts.
export const filmPatchSchema = z.object({
  ...Object.fromEntries(Object.entries(filmFields).map(([k, v]) => [k, v.optional()])) as { [K in keyof typeof filmFields]: z.ZodOptional<(typeof filmFields)[K]> },
  retired: z.boolean().optional(),
  retiredReason: z.string().trim().max(500).optional(),
})

export const polymerQuerySchema = z.object({ q: z.string().trim().max(80).optional() })

export const labApprovalSchema = z.object({
  safetyDataSheet: z.string().trim().min(3, { message: 'Name the safety data sheet the lab judged: maker, product, revision or date, or its address.' }).max(300),
})

export const filmStockSchema = z.object({
  kind: z.enum(['delivery', 'count'], { message: 'Choose a delivery or a count.' }),
  sheets: z.number({ message: 'How many sheets?' }).int().min(0).max(100_000),
  note: z.string().trim().max(300).default(''),
}).superRefine((v, ctx) => {
  if (v.kind === 'delivery' && v.sheets < 1) ctx.addIssue({ code: 'custom', path: ['sheets'], message: 'A delivery brings at least one sheet.' })
})

const settingRange = (name: string, max: number, maxSteps: number) => z.object({
  from: z.number({ message: `Enter the first ${name}.` }).gt(0).max(max),
  to: z.number({ message: `Enter the last ${name}.` }).gt(0).max(max),
  steps: z.number({ message: `How many ${name} steps?` }).int().min(1).max(maxSteps),
}).refine((r) => r.steps > 1 || r.from === r.to, { message: `One ${name} step needs the same first and last value.` })

export const TEST_GRID_DEFAULTS = { power: { from: 30, to: 80, steps: 6 }, speed: { from: 5, to: 25, steps: 5 }, passes: 1, squareMm: 10 } as const

export const testGridSchema = z.object({
  power: settingRange('power', 100, 26),
  speed: settingRange('speed', 1000, 20),
  passes: z.number({ message: 'Enter the number of passes.' }).int().min(1).max(20),
  squareMm: z.number({ message: 'Enter the size of each square in mm.' }).min(3).max(40),
})

const num = (fallback: number) => z.coerce.number().default(fallback)
/** The grid in the address of its downloads: ?powerFrom=&powerTo=&powerSteps=&speedFrom=… */
export const testGridQuerySchema = z.object({
  powerFrom: num(TEST_GRID_DEFAULTS.power.from), powerTo: num(TEST_GRID_DEFAULTS.power.to), powerSteps: num(TEST_GRID_DEFAULTS.power.steps),
  speedFrom: num(TEST_GRID_DEFAULTS.speed.from), speedTo: num(TEST_GRID_DEFAULTS.speed.to), speedSteps: num(TEST_GRID_DEFAULTS.speed.steps),
  passes: num(TEST_GRID_DEFAULTS.passes), squareMm: num(TEST_GRID_DEFAULTS.squareMm),
}).transform((q) => ({
  power: { from: q.powerFrom, to: q.powerTo, steps: q.powerSteps }, speed: { from: q.speedFrom, to: q.speedTo, steps: q.speedSteps },
  passes: q.passes, squareMm: q.squareMm,
})).pipe(testGridSchema)

export const filmTestSchema = z.object({
  grid: testGridSchema,
  /** The square that weeded cleanly, by its label on the grid; null when none did. */
  square: z.string().trim().toUpperCase().regex(/^[A-Z][0-9]{1,2}$/, { message: 'Give the square as its label, e.g. C4.' }).nullable(),
  kerfMm: z.number({ message: 'Enter the kerf you measured in mm, or leave it empty.' }).min(0).lt(2).nullable().default(null),
  note: z.string().trim().max(500).default(''),
})

export const robotSchema = z.object({
  teamId: z.number({ message: 'Choose a team.' }).int().positive(),
  name: z.string().trim().min(1, { message: 'Name the robot.' }).max(80),
  season: z.string().trim().min(1, { message: 'Say which season, e.g. 2026–27.' }).max(40),
})

const placementFields = {
  spot: z.string().trim().min(1, { message: 'Say where it goes, e.g. "left side panel".' }).max(120),
  widthMm: widthMmSchema,
  quantity: z.number({ message: 'How many go on the robot?' }).int().min(PLACEMENT_LIMITS.quantity.min).max(PLACEMENT_LIMITS.quantity.max),
  spares: z.number({ message: 'How many spares?' }).int().min(PLACEMENT_LIMITS.spares.min).max(PLACEMENT_LIMITS.spares.max),
}

/** Which side of the robot a placement is on; null when not said. */
const sideSchema = z.enum(ROBOT_SIDES, { message: 'Choose a side of the robot.' }).nullable()

export const placementSchema = z.object({
  robotId: z.number({ message: 'Choose a robot.' }).int().positive(),
  revisionId: z.number({ message: 'Choose an approved revision.' }).int().positive(),
  /** The film of a one-colour decal (for a layered one, its bottom layer's: layerFilmIds[0] when left out). */
  filmId: z.number({ message: 'Choose a film.' }).int().positive().optional(),
  /** A layered decal's film per layer, bottom first. */
  layerFilmIds: z.array(z.number({ message: 'Choose a film for each layer.' }).int().positive(), { message: 'Choose a film for each layer.' })
    .min(1).max(MAX_LAYERS).optional(),
  ...placementFields,
  spares: placementFields.spares.default(PLACEMENT_LIMITS.spares.default),
  side: sideSchema.default(null),
  /** Its spares travel in the robot's event kit. */
  neededAtEvents: z.boolean().default(false),
}).refine((v) => v.filmId !== undefined || v.layerFilmIds !== undefined, { message: 'Choose a film.', path: ['filmId'] })

/** A change to a placement: any of its spot, side, width, copies on the robot, spares and whether it is needed at events. */
export const placementPatchSchema = z.object({
  spot: placementFields.spot.optional(),
  widthMm: placementFields.widthMm.optional(),
  quantity: placementFields.quantity.optional(),
  spares: placementFields.spares.optional(),
  side: sideSchema.optional(),
  neededAtEvents: z.boolean().optional(),
}).refine((v) => Object.values(v).some((x) => x !== undefined), { message: 'Change at least one thing.' })

const reasonSchema = (example: string) => z.string().trim().min(1, { message: `Say why, e.g. "${example}".` }).max(500)

export const placementRemovalSchema = z.object({ reason: reasonSchema('the panel was replaced') })

export const reprintSchema = z.object({
  quantity: z.number({ message: 'How many to reprint?' }).int().min(PLACEMENT_LIMITS.reprint.min, { message: 'At least one.' }).max(PLACEMENT_LIMITS.reprint.max),
  reason: z.string().trim().min(1, { message: 'Say what happened, e.g. "torn off in a match".' }).max(500),
  /** One damaged layer of a layered decal (from 0, bottom first); every layer when left out. */
  layer: z.number({ message: 'Choose a layer.' }).int().min(0).max(MAX_LAYERS - 1).optional(),
})

/** Spares taken from the shelf and put on the robot. */
export const applySpareSchema = z.object({
  count: z.number({ message: 'How many spares went on the robot?' }).int().min(1, { message: 'At least one.' }).max(PLACEMENT_LIMITS.reprint.max),
  reason: z.string().trim().min(1, { message: 'Say what happened, e.g. "torn off in a match".' }).max(500),
})

export const jobStateSchema = z.object({
  state: z.enum(['cut', 'applied'], { message: 'Choose cut or applied.' }),
  /** With "cut": the sheets the job used (the layout's count by default). */
  sheetsUsed: z.number({ message: 'How many sheets were used?' }).int().min(0).max(1000).optional(),
  /** With "applied": how many copies went on the robot (the rest stay as spares). */
  applied: z.number({ message: 'How many went on the robot?' }).int().min(0).max(10_000).optional(),
})

export const jobCancelSchema = z.object({ reason: reasonSchema('asked for twice') })

export const jobFailureSchema = z.object({
  failure: z.enum(CUT_FAILURES, { message: 'Say what went wrong: burnt, lifted, mis-weeded or something else.' }),
  note: z.string().trim().max(500).default(''),
  /** How many copies to cut again (all of the job's by default). */
  copies: z.number({ message: 'How many copies to cut again?' }).int().min(1).max(10_000).optional(),
  /** With a job that was still queued: the sheets the failed cut used (the layout's count by default). */
  sheetsUsed: z.number({ message: 'How many sheets were used?' }).int().min(0).max(1000).optional(),
})

export const robotPatchSchema = z.object({
  name: z.string().trim().min(1, { message: 'Name the robot.' }).max(80).optional(),
  season: z.string().trim().min(1, { message: 'Say which season, e.g. 2026–27.' }).max(40).optional(),
}).refine((v) => v.name !== undefined || v.season !== undefined, { message: 'Change the name or the season.' })

export const artworkPatchSchema = z.object({
  title: z.string().trim().min(1, { message: 'Give the artwork a title.' }).max(120, { message: 'Use at most 120 characters.' }),
})

const sheetDimension = (d: keyof typeof CUT_SHEET_LIMITS) =>
  formNumber(z.number().min(CUT_SHEET_LIMITS[d].min).max(CUT_SHEET_LIMITS[d].max).default(CUT_SHEET_LIMITS[d].default))

const weedingDimension = (d: keyof typeof WEEDING_LINE_LIMITS) =>
  formNumber(z.number().min(WEEDING_LINE_LIMITS[d].min).max(WEEDING_LINE_LIMITS[d].max).default(WEEDING_LINE_LIMITS[d].default))

export const cutSheetQuerySchema = z.object({
  mirror: z.enum(['0', '1']).default('0').transform((v) => v === '1'),
  frame: sheetDimension('frame'),
  gap: sheetDimension('gap'),
  margin: sheetDimension('margin'),
  sheet: formNumber(z.number().int().min(1).optional()),
  /** Overrides the film's kerf; 0 turns compensation off. */
  kerf: formNumber(z.number().min(0).lt(2).optional()),
  /** Each copy's id written beside it, or only as the id of its group in the SVG. */
  labels: z.enum(['text', 'ids']).default('text'),
  weeding: z.enum(['0', '1']).default('0').transform((v) => v === '1'),
  clearance: weedingDimension('clearance'),
  spacing: weedingDimension('spacing'),
})

export const batchCreateSchema = z.object({
  jobIds: z.array(z.number().int().positive(), { message: 'Choose the jobs to cut together.' })
    .min(2, 'A batch needs at least two jobs.').max(100, 'At most 100 jobs in one batch.')
    .refine((ids) => new Set(ids).size === ids.length, 'Each job once.'),
})

export const batchCutSchema = z.object({
  /** The sheets the batch used, when not as laid out with the default options. */
  sheetsUsed: z.number().int().min(0).max(1000).optional(),
})

export const jobListQuerySchema = z.object({
  filmId: optionalId,
  teamId: optionalId,
  state: z.enum(JOB_STATES).optional(),
  ...pageQuery(50),
})

export const laserWorkAreaSchema = z.object({
  widthMm: z.number({ message: 'Enter the width of the work area in mm.' }).gt(0).max(5000),
  heightMm: z.number({ message: 'Enter the height of the work area in mm.' }).gt(0).max(5000),
}).nullable()

export const programPatchSchema = z.object({ laserWorkArea: laserWorkAreaSchema })
