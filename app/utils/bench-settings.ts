// The settings a designer steers on the tuning bench, their defaults and limits.
//
// Defaults and limits are the pipeline's own (shared/utils/settings.ts); the server checks
// every request in full again.
import { DEFAULT_SETTINGS, SETTING_LIMITS as PIPELINE_LIMITS } from '#shared/utils/settings'
import { WIDTH_MM_MAX, WIDTH_MM_MIN } from '#shared/utils/schemas'

export type Luma = 'bt601' | 'bt709'

export type ThresholdSetting = { mode: 'auto' } | { mode: 'manual', value: number }

export interface CropSetting {
  /** Whole source pixels, on the source turned upright by its orientation tag. */
  x: number
  y: number
  width: number
  height: number
}

export interface BenchSettings {
  luma: Luma
  lightingEvening: { enabled: boolean, strength: number }
  threshold: ThresholdSetting
  swapInkAndPaper: boolean
  crop: CropSetting | null
  speckFilterMm2: number
  cornerRounding: number
  curveTolerance: number
}

export const SETTING_LIMITS = {
  ...PIPELINE_LIMITS,
  widthMm: { min: WIDTH_MM_MIN, max: WIDTH_MM_MAX },
} as const

// The bench's controls still know lighting evening as on/off and the threshold as automatic
// or manual; the pipeline's newer automatic choices are left to the server's defaults.
const DEFAULTS: BenchSettings = {
  luma: DEFAULT_SETTINGS.luma,
  lightingEvening: { enabled: false, strength: DEFAULT_SETTINGS.lightingEvening.strength },
  threshold: { mode: 'auto' },
  swapInkAndPaper: DEFAULT_SETTINGS.swapInkAndPaper,
  crop: DEFAULT_SETTINGS.crop,
  speckFilterMm2: DEFAULT_SETTINGS.speckFilterMm2,
  cornerRounding: DEFAULT_SETTINGS.cornerRounding,
  curveTolerance: DEFAULT_SETTINGS.curveTolerance,
}
export const BENCH_DEFAULTS: Readonly<BenchSettings> = Object.freeze(DEFAULTS)

export function clampNumber(v: unknown, min: number, max: number, fallback: number): number {
  const n = typeof v === 'number' ? v : Number(v)
  if (!Number.isFinite(n)) return fallback
  return Math.min(max, Math.max(min, n))
}

export function cloneSettings(s: BenchSettings): BenchSettings {
  return {
    luma: s.luma,
    lightingEvening: { ...s.lightingEvening },
    threshold: s.threshold.mode === 'manual' ? { mode: 'manual', value: s.threshold.value } : { mode: 'auto' },
    swapInkAndPaper: s.swapInkAndPaper,
    crop: s.crop ? { ...s.crop } : null,
    speckFilterMm2: s.speckFilterMm2,
    cornerRounding: s.cornerRounding,
    curveTolerance: s.curveTolerance,
  }
}

/**
 * Settings as the server stored them (or anything close) → complete, in-range bench settings.
 * Missing fields take the defaults, as the server's schema does.
 */
export function normaliseSettings(input: unknown): BenchSettings {
  const raw = (input && typeof input === 'object' ? input : {}) as Record<string, any>
  const d = BENCH_DEFAULTS
  const L = SETTING_LIMITS
  const le = raw.lightingEvening && typeof raw.lightingEvening === 'object' ? raw.lightingEvening : {}
  const th = raw.threshold && typeof raw.threshold === 'object' ? raw.threshold : {}
  const crop = raw.crop && typeof raw.crop === 'object' ? raw.crop : null
  return {
    luma: raw.luma === 'bt601' ? 'bt601' : 'bt709',
    lightingEvening: {
      enabled: typeof le.enabled === 'boolean' ? le.enabled : d.lightingEvening.enabled,
      strength: clampNumber(le.strength ?? d.lightingEvening.strength, L.lightingStrength.min, L.lightingStrength.max, d.lightingEvening.strength),
    },
    threshold: th.mode === 'manual'
      ? { mode: 'manual', value: Math.round(clampNumber(th.value, L.threshold.min, L.threshold.max, 128)) }
      : { mode: 'auto' },
    swapInkAndPaper: raw.swapInkAndPaper === true,
    crop: crop && [crop.x, crop.y, crop.width, crop.height].every((v) => Number.isFinite(Number(v)))
      ? {
          x: Math.max(0, Math.round(Number(crop.x))),
          y: Math.max(0, Math.round(Number(crop.y))),
          width: Math.max(1, Math.round(Number(crop.width))),
          height: Math.max(1, Math.round(Number(crop.height))),
        }
      : null,
    speckFilterMm2: clampNumber(raw.speckFilterMm2 ?? d.speckFilterMm2, L.speckFilterMm2.min, L.speckFilterMm2.max, d.speckFilterMm2),
    cornerRounding: clampNumber(raw.cornerRounding ?? d.cornerRounding, L.cornerRounding.min, L.cornerRounding.max, d.cornerRounding),
    curveTolerance: clampNumber(raw.curveTolerance ?? d.curveTolerance, L.curveTolerance.min, L.curveTolerance.max, d.curveTolerance),
  }
}

/** A stable text key of settings and width, for "is this what was saved?" checks. */
export function settingsKey(s: BenchSettings, widthMm: number): string {
  const n = normaliseSettings(s)
  return JSON.stringify([n.luma, n.lightingEvening.enabled, n.lightingEvening.strength, n.threshold, n.swapInkAndPaper, n.crop, n.speckFilterMm2, n.cornerRounding, n.curveTolerance, widthMm])
}

export function sameSettings(a: BenchSettings, aWidth: number, b: BenchSettings, bWidth: number): boolean {
  return settingsKey(a, aWidth) === settingsKey(b, bWidth)
}

/** Height that follows from the width: the cropped (or whole) source keeps its proportions. */
export function followingHeightMm(widthMm: number, source: { widthPx: number, heightPx: number }, crop: CropSetting | null): number {
  const w = crop ? crop.width : source.widthPx
  const h = crop ? crop.height : source.heightPx
  if (!(w > 0) || !(h > 0)) return 0
  return (widthMm * h) / w
}

/** One row of a settings read-out: the label a designer knows, and the value in words. */
export interface SettingLine {
  key: string
  label: string
  value: string
}

const fmt = (v: number, digits = 2) => Number(v.toFixed(digits)).toString()

/** The settings (and width) in words, one line each, in the bench's order. */
export function describeSettings(s: BenchSettings, widthMm: number): SettingLine[] {
  return [
    { key: 'widthMm', label: 'Width', value: `${fmt(widthMm, 1)} mm` },
    { key: 'threshold', label: 'Threshold', value: s.threshold.mode === 'auto' ? 'Automatic (Otsu)' : `Manual, ${s.threshold.value}` },
    { key: 'lightingEvening', label: 'Lighting evening', value: s.lightingEvening.enabled ? `On, strength ${Math.round(s.lightingEvening.strength * 100)} %` : 'Off' },
    { key: 'swapInkAndPaper', label: 'Swap ink and paper', value: s.swapInkAndPaper ? 'Swapped' : 'Not swapped' },
    { key: 'crop', label: 'Crop', value: s.crop ? `${s.crop.width} × ${s.crop.height} px at (${s.crop.x}, ${s.crop.y})` : 'Whole source' },
    { key: 'speckFilterMm2', label: 'Speck filter', value: `${fmt(s.speckFilterMm2, 2)} mm²` },
    { key: 'cornerRounding', label: 'Corner rounding', value: fmt(s.cornerRounding, 2) },
    { key: 'curveTolerance', label: 'Curve tolerance', value: fmt(s.curveTolerance, 2) },
    { key: 'luma', label: 'Grey mix (luma)', value: s.luma === 'bt601' ? 'ITU-R BT.601' : 'ITU-R BT.709' },
  ]
}
