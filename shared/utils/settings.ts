// Settings of one revision's clean-up and outline, with their defaults.
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
} as const

export const cropSchema = z.object({
  // Source pixels, measured on the source after it has been turned upright by its
  // orientation tag. Whole pixels; the rectangle must lie inside the source.
  x: z.number().int().min(0),
  y: z.number().int().min(0),
  width: z.number().int().min(1),
  height: z.number().int().min(1),
})

export const thresholdSchema = z.discriminatedUnion('mode', [
  z.object({ mode: z.literal('auto') }),
  z.object({ mode: z.literal('manual'), value: z.number().int().min(SETTING_LIMITS.threshold.min).max(SETTING_LIMITS.threshold.max) }),
])

export const pipelineSettingsSchema = z.object({
  luma: z.enum(['bt601', 'bt709']).default('bt709'),
  lightingEvening: z.object({
    enabled: z.boolean().default(false),
    strength: z.number().min(SETTING_LIMITS.lightingStrength.min).max(SETTING_LIMITS.lightingStrength.max).default(1),
  }).default({ enabled: false, strength: 1 }),
  threshold: thresholdSchema.default({ mode: 'auto' }),
  swapInkAndPaper: z.boolean().default(false),
  crop: cropSchema.nullable().default(null),
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

export const DEFAULT_SETTINGS: PipelineSettings = Object.freeze(pipelineSettingsSchema.parse({})) as PipelineSettings

/** Validated settings with defaults filled in. Throws a ZodError on bad input. */
export function parseSettings(input: unknown): PipelineSettings {
  return pipelineSettingsSchema.parse(input ?? {})
}

/**
 * Long side of the shrunk copy of a source that previews start from: comfortably more than
 * the preview's own resolution needs (a 150 mm design at 6 px/mm is 900 px wide).
 */
export const PREVIEW_SOURCE_SIDE = 1280
