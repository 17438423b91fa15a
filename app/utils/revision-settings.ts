// The settings form of a new revision, in the form's own terms (strings as typed, plain
// booleans). The limits are the pipeline's own (shared/utils/settings.ts); the server checks
// again, the early check here only saves a round trip.

import { WIDTH_MM_MAX, WIDTH_MM_MIN } from '#shared/utils/schemas'
import { DEFAULT_SETTINGS, SETTING_LIMITS } from '#shared/utils/settings'
import { normaliseSettings } from './bench-settings'

export const REVISE_LIMITS = SETTING_LIMITS

/** The pipeline's defaults, for a revision whose stored settings lack a field. */
const DEFAULTS = DEFAULT_SETTINGS

/** Numbers as the inputs hold them: text while being typed, a number once Vue can read one. */
export interface ReviseFields {
  widthMm: string | number
  thresholdMode: 'auto' | 'manual'
  thresholdValue: string | number
  lightingEvening: 'auto' | 'on' | 'off'
  speckFilterMm2: string | number
  cornerRounding: string | number
  curveTolerance: string | number
  swapInkAndPaper: boolean
}

type Stored = Record<string, unknown>

function num(v: unknown, fallback: number): number {
  return typeof v === 'number' && Number.isFinite(v) ? v : fallback
}

/** Rounds away float noise (4/3 → "1.33") without turning 0.2 into "0.20". */
function show(n: number, digits = 2): string {
  return String(Math.round(n * 10 ** digits) / 10 ** digits)
}

/** The form filled from a stored revision, so a new revision starts from what is on screen. */
export function fieldsFromRevision(settings: Stored, widthMm: number, usedThreshold: number): ReviseFields {
  const threshold = (settings.threshold ?? DEFAULTS.threshold) as { mode?: string; value?: unknown }
  const lighting = normaliseSettings(settings).lightingEvening
  const manual = threshold.mode === 'manual'
  return {
    widthMm: show(widthMm, 1),
    thresholdMode: manual ? 'manual' : 'auto',
    // With an automatic threshold, offer the level it chose as the starting point for a manual one.
    thresholdValue: String(manual ? num(threshold.value, usedThreshold) : usedThreshold),
    lightingEvening: lighting.mode,
    speckFilterMm2: show(num(settings.speckFilterMm2, DEFAULTS.speckFilterMm2), 3),
    cornerRounding: show(num(settings.cornerRounding, DEFAULTS.cornerRounding)),
    curveTolerance: show(num(settings.curveTolerance, DEFAULTS.curveTolerance)),
    swapInkAndPaper: settings.swapInkAndPaper === true,
  }
}

// v-model on <input type="number"> hands over a number once the text parses, a string otherwise.
function parseNumber(text: string | number): number | null {
  if (typeof text === 'number') return Number.isFinite(text) ? text : null
  const t = String(text ?? '').trim().replace(',', '.')
  if (t === '') return null
  const n = Number(t)
  return Number.isFinite(n) ? n : null
}

function inRange(name: string, text: string | number, min: number, max: number, unit: string, errors: Record<string, string>, o: { integer?: boolean; slack?: number } = {}): number {
  const n = parseNumber(text)
  const range = `${show(min)}–${show(max)}${unit}`
  if (n === null) errors[name] = `Enter a number from ${range}.`
  else if (o.integer && !Number.isInteger(n)) errors[name] = `Enter a whole number from ${range}.`
  else if (n < min || n > max + (o.slack ?? 0)) errors[name] = `Use a value from ${range}.`
  return n ?? 0
}

/**
 * The request body for POST /api/artworks/:id/revisions, or the field errors. Settings the
 * form does not show (luma, crop, lighting strength) are carried over from the base revision.
 */
export function revisionRequest(fields: ReviseFields, base: Stored): { body: { widthMm: number; settings: Stored } | null; errors: Record<string, string> } {
  const errors: Record<string, string> = {}
  const widthMm = inRange('widthMm', fields.widthMm, WIDTH_MM_MIN, WIDTH_MM_MAX, ' mm', errors)
  const L = REVISE_LIMITS
  const thresholdValue = fields.thresholdMode === 'manual'
    ? inRange('thresholdValue', fields.thresholdValue, L.threshold.min, L.threshold.max, '', errors, { integer: true })
    : 0
  const speckFilterMm2 = inRange('speckFilterMm2', fields.speckFilterMm2, L.speckFilterMm2.min, L.speckFilterMm2.max, ' mm²', errors)
  const cornerRounding = inRange('cornerRounding', fields.cornerRounding, L.cornerRounding.min, L.cornerRounding.max, '', errors, { slack: 0.005 })
  const curveTolerance = inRange('curveTolerance', fields.curveTolerance, L.curveTolerance.min, L.curveTolerance.max, '', errors)
  if (Object.keys(errors).length) return { body: null, errors }
  const settings: Stored = {
    ...base,
    threshold: fields.thresholdMode === 'manual' ? { mode: 'manual', value: thresholdValue } : { mode: 'auto' },
    lightingEvening: { strength: normaliseSettings(base).lightingEvening.strength, mode: fields.lightingEvening },
    swapInkAndPaper: fields.swapInkAndPaper,
    speckFilterMm2,
    // The upper bound is exactly 4/3; "1.33" as shown (or typed) means that.
    cornerRounding: Math.abs(cornerRounding - L.cornerRounding.max) < 0.005 ? L.cornerRounding.max : cornerRounding,
    curveTolerance,
  }
  return { body: { widthMm, settings }, errors }
}

/** Where the server's field errors (named after the settings schema) show in this form. */
export function reviseFieldFor(serverField: string): string {
  if (serverField === 'threshold') return 'thresholdValue'
  return serverField
}
