// The settings a designer steers on the tuning bench, their defaults and limits.
//
// Defaults and limits are the pipeline's own (shared/utils/settings.ts); the server checks
// every request in full again.
import { DEFAULT_SETTINGS, pipelineSettingsSchema, SETTING_LIMITS as PIPELINE_LIMITS, type CropRect, type PipelineSettings } from '#shared/utils/settings'
import { WIDTH_MM_MAX, WIDTH_MM_MIN } from '#shared/utils/schemas'

/** The bench steers exactly the pipeline's settings (inferred from its zod schema). */
export type BenchSettings = PipelineSettings
export type Luma = PipelineSettings['luma']
export type ThresholdSetting = PipelineSettings['threshold']
/** Whole source pixels, on the source turned upright by its orientation tag. */
export type CropSetting = CropRect

export const SETTING_LIMITS = {
  ...PIPELINE_LIMITS,
  widthMm: { min: WIDTH_MM_MIN, max: WIDTH_MM_MAX },
} as const

/** Every clean-up choice automatic, as a student who never opens a setting gets it. */
export const BENCH_DEFAULTS: Readonly<BenchSettings> = DEFAULT_SETTINGS

export function clampNumber(v: unknown, min: number, max: number, fallback: number): number {
  const n = typeof v === 'number' ? v : Number(v)
  if (!Number.isFinite(n)) return fallback
  return Math.min(max, Math.max(min, n))
}

/** A deep copy, also of Vue's reactive proxies (settings are plain JSON). */
export function cloneSettings(s: BenchSettings): BenchSettings {
  return JSON.parse(JSON.stringify(s)) as BenchSettings
}

function fields(v: unknown): Record<string, unknown> {
  return v && typeof v === 'object' ? v as Record<string, unknown> : {}
}

/**
 * Settings as the server stored them (or anything close) → complete, in-range bench settings.
 * What the pipeline's own schema accepts is taken as it is; anything else is mended field by
 * field, and missing fields take the defaults, as the server's schema does.
 */
export function normaliseSettings(input: unknown): BenchSettings {
  const parsed = pipelineSettingsSchema.safeParse(input ?? {})
  if (parsed.success) return parsed.data
  const raw = fields(input)
  const d = BENCH_DEFAULTS
  const L = SETTING_LIMITS
  // Each field the schema accepts on its own is kept; numbers out of range are brought in.
  const out = structuredClone(d) as Record<string, unknown>
  for (const [key, field] of Object.entries(pipelineSettingsSchema.shape)) {
    const one = (field as { safeParse: (v: unknown) => { success: boolean; data?: unknown } }).safeParse(raw[key])
    if (one.success && raw[key] !== undefined) out[key] = one.data
  }
  const clamped = out as BenchSettings
  clamped.speckFilterMm2 = clampNumber(raw.speckFilterMm2 ?? d.speckFilterMm2, L.speckFilterMm2.min, L.speckFilterMm2.max, d.speckFilterMm2)
  clamped.cornerRounding = clampNumber(raw.cornerRounding ?? d.cornerRounding, L.cornerRounding.min, L.cornerRounding.max, d.cornerRounding)
  clamped.curveTolerance = clampNumber(raw.curveTolerance ?? d.curveTolerance, L.curveTolerance.min, L.curveTolerance.max, d.curveTolerance)
  clamped.marginMm = clampNumber(raw.marginMm ?? d.marginMm, L.marginMm.min, L.marginMm.max, d.marginMm)
  clamped.fineAngleDeg = clampNumber(raw.fineAngleDeg ?? d.fineAngleDeg, L.fineAngleDeg.min, L.fineAngleDeg.max, d.fineAngleDeg)
  const crop = raw.crop && typeof raw.crop === 'object' ? fields(raw.crop) : null
  if (crop && [crop.x, crop.y, crop.width, crop.height].every((v) => Number.isFinite(Number(v)))) {
    clamped.crop = {
      x: Math.max(0, Math.round(Number(crop.x))), y: Math.max(0, Math.round(Number(crop.y))),
      width: Math.max(1, Math.round(Number(crop.width))), height: Math.max(1, Math.round(Number(crop.height))),
    }
  }
  const th = fields(raw.threshold)
  if (th.mode === 'manual') clamped.threshold = { mode: 'manual', value: Math.round(clampNumber(th.value, L.threshold.min, L.threshold.max, 128)) }
  return clamped
}

/** A stable text key of settings and width, for "is this what was saved?" checks. */
export function settingsKey(s: BenchSettings, widthMm: number): string {
  return JSON.stringify([normaliseSettings(s), widthMm])
}

export function sameSettings(a: BenchSettings, aWidth: number, b: BenchSettings, bWidth: number): boolean {
  return settingsKey(a, aWidth) === settingsKey(b, bWidth)
}

/** What a run made: the drawing's width and margin asked for, and the decal's size that came out. */
export interface KnownSize { drawingWidthMm: number; marginMm: number; widthMm: number; heightMm: number }

/**
 * The decal's size for a drawing `drawingWidthMm` wide with `marginMm` of paper around it,
 * from the last run's: the drawing keeps its proportions (its ink's height scales with its
 * width), the margin is added on every side. Null before any run.
 */
export function decalSizeMm(drawingWidthMm: number, marginMm: number, known: KnownSize | null): { widthMm: number; heightMm: number } | null {
  if (!known || !(known.drawingWidthMm > 0)) return null
  const inkHeight = Math.max(0, known.heightMm - 2 * known.marginMm)
  return { widthMm: drawingWidthMm + 2 * marginMm, heightMm: (inkHeight * drawingWidthMm) / known.drawingWidthMm + 2 * marginMm }
}

/** One row of a settings read-out: the label a designer knows, and the value in words. */
export interface SettingLine {
  key: string
  label: string
  value: string
}

const fmt = (v: number, digits = 2) => Number(v.toFixed(digits)).toString()

export function thresholdWords(t: ThresholdSetting): string {
  switch (t.mode) {
    case 'auto': return 'Automatic'
    case 'otsu': return 'One level for the sheet (Otsu)'
    case 'adaptive': return `Local, ${fmt(t.windowMm, 1)} mm window (Sauvola)`
    case 'manual': return `Manual, ${t.value}`
  }
}

/** The settings (and width) in words, one line each, in the bench's order. */
export function describeSettings(s: BenchSettings, widthMm: number): SettingLine[] {
  return [
    { key: 'widthMm', label: 'Width of the drawing', value: `${fmt(widthMm, 1)} mm` },
    { key: 'threshold', label: 'Threshold', value: thresholdWords(s.threshold) },
    { key: 'lightingEvening', label: 'Lighting evening', value: s.lightingEvening.mode === 'off' ? 'Off' : `${s.lightingEvening.mode === 'auto' ? 'Automatic' : 'On'}, strength ${Math.round(s.lightingEvening.strength * 100)} %` },
    { key: 'corners', label: 'Straighten the sheet', value: s.corners.mode === 'auto' ? 'Automatic' : s.corners.mode === 'off' ? 'Off' : 'By four corners' },
    { key: 'turn', label: 'Turn', value: `${s.quarterTurns * 90 + s.fineAngleDeg}°` },
    { key: 'inkColour', label: 'Ink read by', value: { auto: 'Automatic', dark: 'Darkness', colour: 'Colour against the paper' }[s.inkColour] },
    { key: 'dropoutColour', label: 'Colour left out', value: s.dropoutColour.mode === 'auto' ? 'Automatic' : s.dropoutColour.mode === 'none' ? 'None' : s.dropoutColour.colours.join(', ') },
    { key: 'paperLines', label: 'Ruled or grid lines', value: { auto: 'Automatic', keep: 'Kept', remove: 'Removed' }[s.paperLines] },
    { key: 'marginMm', label: 'Margin around the drawing', value: `${fmt(s.marginMm, 1)} mm` },
    { key: 'thickenToMm', label: 'Thin strokes', value: s.thickenToMm === null ? 'Kept as drawn' : `Thickened to ${fmt(s.thickenToMm, 2)} mm` },
    { key: 'swapInkAndPaper', label: 'Swap ink and paper', value: s.swapInkAndPaper ? 'Swapped' : 'Not swapped' },
    { key: 'crop', label: 'Crop', value: s.crop ? `${s.crop.width} × ${s.crop.height} px at (${s.crop.x}, ${s.crop.y})` : 'Whole source' },
    { key: 'speckFilterMm2', label: 'Speck filter', value: `${fmt(s.speckFilterMm2, 2)} mm²` },
    { key: 'cornerRounding', label: 'Corner rounding', value: fmt(s.cornerRounding, 2) },
    { key: 'curveTolerance', label: 'Curve tolerance', value: fmt(s.curveTolerance, 2) },
    { key: 'luma', label: 'Grey mix (luma)', value: s.luma === 'bt601' ? 'ITU-R BT.601' : 'ITU-R BT.709' },
  ]
}
