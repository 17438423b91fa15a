// Settings of one revision's clean-up and outline, with their defaults.
//
// Automatic is a setting like any other: each clean-up choice the pipeline can make by itself
// (straightening the sheet, lighting evening, how ink is read from colour, dropping a colour,
// removing ruled or grid lines, the threshold method) has an 'auto' value, and 'auto' is the
// default, so a student who never opens a setting gets the pipeline's own choice. Every
// other value pins the choice. A run reports, for each choice, the value used and why
// (CleanUpChoice in shared/types/pipeline.ts); writing that value back into the settings
// keeps the choice for later revisions.
import { z } from 'zod'

/** Largest corner rounding the tracer accepts: 4/3, where every corner becomes a curve. */
export const CORNER_ROUNDING_MAX = 4 / 3

/** Limits of every setting, for the server's schema below and the forms of the app alike. */
export const SETTING_LIMITS = {
  threshold: { min: 0, max: 255 },
  lightingStrength: { min: 0, max: 1 },
  speckFilterMm2: { min: 0, max: 1000 },
  cornerRounding: { min: 0, max: CORNER_ROUNDING_MAX },
  curveTolerance: { min: 0, max: 1 },
  /** Side of the adaptive threshold's window at the decal's size, mm. */
  adaptiveWindowMm: { min: 1, max: 100 },
  /** Sauvola's k: how far below the local mean the threshold sits where the paper is plain. */
  adaptiveK: { min: 0.05, max: 0.5 },
  /** Sauvola's R: the spread of grey levels (standard deviation) that counts as full contrast. */
  adaptiveR: { min: 8, max: 255 },
  fineAngleDeg: { min: -45, max: 45 },
  marginMm: { min: 0, max: 50 },
  /** Width thin strokes are thickened to, mm (when thickening is on). */
  thickenToMm: { min: 0.1, max: 10 },
} as const

/**
 * Defaults of the adaptive threshold: a window of 8 mm at the decal's size, and Sauvola's own
 * k = 0.2 and R = 127.5 (half the 8-bit range).
 */
export const ADAPTIVE_DEFAULTS = { windowMm: 8, k: 0.2, r: 127.5 } as const

export const cropSchema = z.object({
  // Source pixels, measured on the source after it has been turned upright by its
  // orientation tag. Whole pixels; the rectangle must lie inside the source.
  x: z.number().int().min(0),
  y: z.number().int().min(0),
  width: z.number().int().min(1),
  height: z.number().int().min(1),
})

export const thresholdSchema = z.discriminatedUnion('mode', [
  /** The pipeline picks Otsu or the adaptive method from the source. */
  z.object({ mode: z.literal('auto') }),
  /** One level for the whole sheet, by Otsu's method. */
  z.object({ mode: z.literal('otsu') }),
  /** A level for every pixel from its neighbourhood (Sauvola), window in mm at the decal's size. */
  z.object({
    mode: z.literal('adaptive'),
    windowMm: z.number().min(SETTING_LIMITS.adaptiveWindowMm.min).max(SETTING_LIMITS.adaptiveWindowMm.max).default(ADAPTIVE_DEFAULTS.windowMm),
    k: z.number().min(SETTING_LIMITS.adaptiveK.min).max(SETTING_LIMITS.adaptiveK.max).default(ADAPTIVE_DEFAULTS.k),
    r: z.number().min(SETTING_LIMITS.adaptiveR.min).max(SETTING_LIMITS.adaptiveR.max).default(ADAPTIVE_DEFAULTS.r),
  }),
  z.object({ mode: z.literal('manual'), value: z.number().int().min(SETTING_LIMITS.threshold.min).max(SETTING_LIMITS.threshold.max) }),
])

/** A point on the upright source, in source pixels (fractions allowed). */
export const sourcePointSchema = z.object({ x: z.number().min(0), y: z.number().min(0) })

export const cornersSchema = z.discriminatedUnion('mode', [
  /** Find the sheet's four corners in the photo; leave the source as it is when none are found. */
  z.object({ mode: z.literal('auto') }),
  /** Take the source as it is. */
  z.object({ mode: z.literal('off') }),
  /**
   * The sheet's corners on the upright source, in the order top left, top right, bottom
   * right, bottom left of the sheet as it should come out.
   */
  z.object({ mode: z.literal('manual'), points: z.tuple([sourcePointSchema, sourcePointSchema, sourcePointSchema, sourcePointSchema]) }),
])

const lightingSchema = z.object({
  mode: z.enum(['auto', 'on', 'off']).default('auto'),
  strength: z.number().min(SETTING_LIMITS.lightingStrength.min).max(SETTING_LIMITS.lightingStrength.max).default(1),
})

/** Settings stored before lighting evening could be automatic said { enabled: boolean }. */
function readLegacyLighting(v: unknown): unknown {
  if (v && typeof v === 'object' && !('mode' in v) && typeof (v as { enabled?: unknown }).enabled === 'boolean') {
    const { enabled, ...rest } = v as { enabled: boolean }
    return { ...rest, mode: enabled ? 'on' : 'off' }
  }
  return v
}

/** #rrggbb, lower or upper case. */
export const hexColourSchema = z.string().regex(/^#[0-9a-fA-F]{6}$/, 'A colour is written #rrggbb.')

export const dropoutSchema = z.discriminatedUnion('mode', [
  /** Drop the colour of ruled or grid lines when it differs from the ink's. */
  z.object({ mode: z.literal('auto') }),
  z.object({ mode: z.literal('none') }),
  /** Read the ink as if these colours were paper (at most two). */
  z.object({ mode: z.literal('colours'), colours: z.array(hexColourSchema).min(1).max(2) }),
])

export const pipelineSettingsSchema = z.object({
  luma: z.enum(['bt601', 'bt709']).default('bt709'),
  /** Straighten a sheet photographed at an angle (perspective), from its four corners. */
  corners: cornersSchema.default({ mode: 'auto' }),
  /** Quarter turns clockwise, after straightening. */
  quarterTurns: z.number().int().min(0).max(3).default(0),
  /** A further turn, degrees clockwise, after the quarter turns. */
  fineAngleDeg: z.number().min(SETTING_LIMITS.fineAngleDeg.min).max(SETTING_LIMITS.fineAngleDeg.max).default(0),
  lightingEvening: z.preprocess(readLegacyLighting, lightingSchema).default({ mode: 'auto', strength: 1 }),
  /**
   * How ink is told from paper: 'dark' by its grey level (luma), as for pencil and black pen;
   * 'colour' by how much it differs from the paper's own colour in any channel, so a yellow
   * or light-blue marker on white counts as ink.
   */
  inkColour: z.enum(['auto', 'dark', 'colour']).default('auto'),
  dropoutColour: dropoutSchema.default({ mode: 'auto' }),
  /** Thin, evenly spaced straight lines across the sheet (ruled or grid paper). */
  paperLines: z.enum(['auto', 'keep', 'remove']).default('auto'),
  threshold: thresholdSchema.default({ mode: 'auto' }),
  swapInkAndPaper: z.boolean().default(false),
  crop: cropSchema.nullable().default(null),
  /** Clear paper added around the drawing's ink on every side, mm. */
  marginMm: z.number().min(SETTING_LIMITS.marginMm.min).max(SETTING_LIMITS.marginMm.max).default(0),
  /**
   * Thin strokes made weedable: every stroke and dot narrower than this, at the decal's size,
   * is thickened to it (mm); null leaves the strokes as drawn.
   */
  thickenToMm: z.number().min(SETTING_LIMITS.thickenToMm.min).max(SETTING_LIMITS.thickenToMm.max).nullable().default(null),
  /** Ink blobs (and holes) of up to this area at the target size are dropped, mm². */
  speckFilterMm2: z.number().min(SETTING_LIMITS.speckFilterMm2.min).max(SETTING_LIMITS.speckFilterMm2.max).default(0.5),
  /** 0 = every corner sharp … 4/3 = no corner left. */
  cornerRounding: z.number().min(SETTING_LIMITS.cornerRounding.min).max(SETTING_LIMITS.cornerRounding.max).default(1),
  /** How far joined curves may stray, in prepared-bitmap pixels; 0 = no joining. */
  curveTolerance: z.number().min(SETTING_LIMITS.curveTolerance.min).max(SETTING_LIMITS.curveTolerance.max).default(0.2),
})

export type PipelineSettings = z.infer<typeof pipelineSettingsSchema>
export type PipelineSettingsInput = z.input<typeof pipelineSettingsSchema>
export type CropRect = z.infer<typeof cropSchema>
export type ThresholdSetting = z.infer<typeof thresholdSchema>
export type CornersSetting = z.infer<typeof cornersSchema>
export type DropoutSetting = z.infer<typeof dropoutSchema>
export type LightingSetting = PipelineSettings['lightingEvening']
export type SourcePoint = z.infer<typeof sourcePointSchema>

export const DEFAULT_SETTINGS: PipelineSettings = Object.freeze(pipelineSettingsSchema.parse({})) as PipelineSettings

/** Validated settings with defaults filled in. Throws a ZodError on bad input. */
export function parseSettings(input: unknown): PipelineSettings {
  return pipelineSettingsSchema.parse(input ?? {})
}

/**
 * The same settings for a copy of the source scaled by `scale` (a preview source): every
 * setting measured in source pixels (crop, corners) is scaled with it, and a crop stays
 * inside the copy's width × height.
 */
export function scaleSourceGeometry(settings: PipelineSettings, scale: number, width: number, height: number): PipelineSettings {
  if (scale === 1) return settings
  let crop = settings.crop
  if (crop) {
    const x = Math.min(width - 1, Math.floor(crop.x * scale))
    const y = Math.min(height - 1, Math.floor(crop.y * scale))
    const right = Math.min(width, Math.max(x + 1, Math.round((crop.x + crop.width) * scale)))
    const bottom = Math.min(height, Math.max(y + 1, Math.round((crop.y + crop.height) * scale)))
    crop = { x, y, width: right - x, height: bottom - y }
  }
  const c = settings.corners
  const corners: CornersSetting = c.mode === 'manual'
    ? { mode: 'manual', points: c.points.map((p) => ({ x: p.x * scale, y: p.y * scale })) as [SourcePoint, SourcePoint, SourcePoint, SourcePoint] }
    : c
  return { ...settings, crop, corners }
}

/**
 * Long side of the shrunk copy of a source that previews start from: comfortably more than
 * the preview's own resolution needs (a 150 mm design at 6 px/mm is 900 px wide).
 */
export const PREVIEW_SOURCE_SIDE = 1280
