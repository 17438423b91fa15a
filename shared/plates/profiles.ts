// Competition rule profiles for number plates: the schema, and the presets shipped with the app.
//
// Every value carries where it comes from: the manual, the rule number and how we know it.
// The manuals state lengths in inches; a length keeps the figure and unit as stated and is
// turned into millimetres only when used (lengthMm), with 1 in = 25.4 mm exactly (the
// international inch, 1959). Rules change every season: the profile says so in its notice,
// and a program can copy a preset and edit it.
import { z } from 'zod'
import { MM_PER_INCH } from '../utils/units'

// ---------------------------------------------------------------------------------------
// Words shared by profiles, plates and checks
// ---------------------------------------------------------------------------------------

/** Colours a rule can name. Film colours are free text; plateColourOf reads them into these. */
export const PLATE_COLOURS = ['white', 'black', 'red', 'blue', 'yellow', 'green', 'orange', 'purple', 'grey'] as const
export type PlateColour = (typeof PLATE_COLOURS)[number]

/** Where on the robot a placement sits, beside its free-text spot. */
export const ROBOT_SIDES = ['front', 'back', 'left', 'right', 'top', 'other'] as const
export type RobotSide = (typeof ROBOT_SIDES)[number]
/** The four upright sides, in order around the robot; each is 90° from its neighbours. */
export const UPRIGHT_SIDES = ['front', 'right', 'back', 'left'] as const satisfies readonly RobotSide[]

/**
 * How we know a value:
 * - 'from this issue': taken from the product issue that quotes the manual, not re-read in
 *   the manual itself (true of every shipped preset value: the manuals were not at hand);
 * - 'read in the manual': checked against the manual's published text;
 * - 'set by the program': a program's own value in a copied profile.
 */
export const PROVENANCES = ['from this issue', 'read in the manual', 'set by the program'] as const
export type Provenance = (typeof PROVENANCES)[number]

export const ruleSourceSchema = z.object({
  /** The document, e.g. "FIRST Tech Challenge 2025–26 Competition Manual". */
  manual: z.string().trim().min(1).max(160),
  /** The rule's number in it, e.g. "R401". */
  rule: z.string().trim().min(1).max(40),
  provenance: z.enum(PROVENANCES),
})
export type RuleSource = z.infer<typeof ruleSourceSchema>

/** A value with its source, and optionally the figure as the manual words it ("2.25 ± 0.5 in"). */
function ruled<T extends z.ZodType>(value: T) {
  return z.object({ value, source: ruleSourceSchema, stated: z.string().trim().max(120).optional() })
}

export const lengthSchema = z.object({
  value: z.number().positive().finite(),
  unit: z.enum(['in', 'mm']),
})
export type Length = z.infer<typeof lengthSchema>

/** A length in millimetres; inches by the international inch (1 in = 25.4 mm exactly). */
export function lengthMm(length: Length): number {
  return length.unit === 'in' ? length.value * MM_PER_INCH : length.value
}

const ruledLength = ruled(lengthSchema)
const ruledColours = ruled(z.array(z.enum(PLATE_COLOURS)).min(1).max(PLATE_COLOURS.length))

/**
 * Which sides the plates must be on:
 * - 'apart-90': at least `count` plates on different upright sides (any two of front, right,
 *   back, left are at least 90° apart);
 * - 'opposite': plates on two opposite sides (front and back, or left and right);
 * - 'every-side': plates on all four upright sides (numerals readable from every side).
 * A plate on the top or on another side does not count: its angle to the others is unknown.
 */
export const sideRuleSchema = z.discriminatedUnion('kind', [
  z.object({ kind: z.literal('apart-90'), count: z.number().int().min(2).max(4) }),
  z.object({ kind: z.literal('opposite') }),
  z.object({ kind: z.literal('every-side') }),
])
export type SideRule = z.infer<typeof sideRuleSchema>

// ---------------------------------------------------------------------------------------
// The profile
// ---------------------------------------------------------------------------------------

export const ruleProfileSchema = z.object({
  /** Stable key, e.g. "ftc-2025-26"; a program's copy gets a key of its own. */
  key: z.string().regex(/^[a-z0-9][a-z0-9-]{1,62}$/),
  competition: z.string().trim().min(1).max(120),
  season: z.string().trim().min(1).max(40),
  /** Title of the manual the values come from. */
  manual: z.string().trim().min(1).max(160),
  /** A plain notice that the current manual decides, shown wherever the profile is. */
  notice: z.string().trim().min(1).max(600),
  numerals: z.object({
    minHeight: ruledLength.nullable(),
    maxHeight: ruledLength.nullable(),
    minStroke: ruledLength.nullable(),
    colours: ruledColours.nullable(),
  }),
  plate: z.object({
    /** Smallest plate: the longer side (width as generated) and the shorter side (height). */
    minWidth: ruledLength.nullable(),
    minHeight: ruledLength.nullable(),
    /** Least distance from the numerals to the plate's edge. */
    margin: ruledLength.nullable(),
    /** Background colours allowed; null when the numerals need no plate behind them. */
    backgrounds: ruledColours.nullable(),
  }),
  sides: ruled(sideRuleSchema),
  /** When set, plates are needed in each of these colours (the two alliances'), each set on the sides asked. */
  allianceColours: ruled(z.array(z.enum(PLATE_COLOURS)).min(2).max(2)).nullable(),
  /** Rules shown with the profile that no measurement can check ("readable from 12 ft"). */
  remarks: z.array(ruled(z.string().trim().min(1).max(300))).max(10),
}).superRefine((p, ctx) => {
  const lo = p.numerals.minHeight, hi = p.numerals.maxHeight
  if (lo && hi && lengthMm(lo.value) > lengthMm(hi.value)) {
    ctx.addIssue({ code: 'custom', path: ['numerals', 'maxHeight'], message: 'The largest numeral height is below the smallest.' })
  }
  const w = p.plate.minWidth, h = p.plate.minHeight
  if (w && h && lengthMm(w.value) < lengthMm(h.value)) {
    ctx.addIssue({ code: 'custom', path: ['plate', 'minWidth'], message: 'Give the longer side of the plate as its width.' })
  }
})
export type RuleProfile = z.infer<typeof ruleProfileSchema>
export type RuledLength = z.infer<typeof ruledLength>

// ---------------------------------------------------------------------------------------
// Presets. Values as quoted in the product issue; the manuals themselves were not re-read,
// so every value is marked 'from this issue'. Check them against the current manual.
// ---------------------------------------------------------------------------------------

const NOTICE = 'Rules change every season and between manual updates. This profile was written from '
  + 'the manual named here; where the current manual or an official update says otherwise, the current '
  + 'manual decides. Check each value before an event.'

const inch = (value: number): Length => ({ value, unit: 'in' })

function presetSources(manual: string) {
  return (rule: string): RuleSource => ({ manual, rule, provenance: 'from this issue' })
}

const FRC_MANUAL = 'FIRST Robotics Competition 2023 Game Manual'
const frc = presetSources(FRC_MANUAL)
const FTC_MANUAL = 'FIRST Tech Challenge 2025–26 Competition Manual'
const ftc = presetSources(FTC_MANUAL)
const VEX_MANUAL = 'VEX V5 Robotics Competition 2024–25 Game Manual'
const vex = presetSources(VEX_MANUAL)

export const PRESET_PROFILES: readonly RuleProfile[] = [
  {
    key: 'frc-2023',
    competition: 'FIRST Robotics Competition',
    season: '2023',
    manual: FRC_MANUAL,
    notice: NOTICE,
    numerals: {
      minHeight: { value: inch(4), source: frc('R406'), stated: 'at least 4 in' },
      maxHeight: null,
      minStroke: { value: inch(0.5), source: frc('R406'), stated: 'at least ½ in for most of their length' },
      colours: { value: ['white'], source: frc('R406'), stated: 'white only' },
    },
    // The numerals go on the bumpers themselves: no plate size, margin or background is stated.
    plate: { minWidth: null, minHeight: null, margin: null, backgrounds: null },
    sides: { value: { kind: 'every-side' }, source: frc('R406'), stated: 'readable from every side' },
    allianceColours: null,
    remarks: [{ value: 'Numerals are on the bumpers.', source: frc('R406') }],
  },
  {
    key: 'ftc-2025-26',
    competition: 'FIRST Tech Challenge',
    season: '2025–26',
    manual: FTC_MANUAL,
    notice: NOTICE,
    numerals: {
      minHeight: { value: inch(2.25 - 0.5), source: ftc('R403'), stated: '2.25 ± 0.5 in' },
      maxHeight: { value: inch(2.25 + 0.5), source: ftc('R403'), stated: '2.25 ± 0.5 in' },
      minStroke: null,
      colours: { value: ['white'], source: ftc('R403'), stated: 'solid white' },
    },
    plate: {
      minWidth: { value: inch(6.5), source: ftc('R402'), stated: 'at least 6.5 × 2.5 in' },
      minHeight: { value: inch(2.5), source: ftc('R402'), stated: 'at least 6.5 × 2.5 in' },
      margin: { value: inch(0.25), source: ftc('R403'), stated: 'at least ¼ in' },
      backgrounds: { value: ['red', 'blue'], source: ftc('R402'), stated: 'a solid red or blue background' },
    },
    sides: { value: { kind: 'apart-90', count: 2 }, source: ftc('R401'), stated: 'at least two signs at least 90° apart' },
    allianceColours: null,
    remarks: [{ value: 'Numerals readable from 12 ft (3.66 m).', source: ftc('R403') }],
  },
  {
    key: 'v5rc-2024-25',
    competition: 'VEX V5 Robotics Competition',
    season: '2024–25',
    manual: VEX_MANUAL,
    notice: NOTICE,
    numerals: {
      minHeight: null,
      maxHeight: null,
      minStroke: null,
      colours: { value: ['white'], source: vex('R10'), stated: 'white numerals' },
    },
    plate: {
      minWidth: { value: inch(4.48), source: vex('R10'), stated: 'at least 2.48 × 4.48 in' },
      minHeight: { value: inch(2.48), source: vex('R10'), stated: 'at least 2.48 × 4.48 in' },
      margin: null,
      backgrounds: { value: ['red', 'blue'], source: vex('R10'), stated: 'in the alliance colour' },
    },
    sides: { value: { kind: 'opposite' }, source: vex('R10'), stated: 'at least two opposite sides' },
    allianceColours: { value: ['red', 'blue'], source: vex('R10'), stated: 'in the alliance colour' },
    remarks: [],
  },
]

export function presetProfile(key: string): RuleProfile | undefined {
  return PRESET_PROFILES.find((p) => p.key === key)
}

/** A program's editable copy of a profile: a new key, and every value kept with its source. */
export function copyProfile(profile: RuleProfile, key: string): RuleProfile {
  return ruleProfileSchema.parse({ ...structuredClone(profile), key })
}
