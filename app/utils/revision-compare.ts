// Two revisions side by side: which settings and measurements differ, and, pixel by pixel,
// where the two outlines differ. Plain code, unit-tested.
import type { Measurements } from '#shared/types/pipeline'
import { describeSettings, normaliseSettings } from './bench-settings'
import { describeMeasurements } from './bench-warnings'

export interface CompareSide {
  number: number
  widthMm: number
  settings: unknown
  measurements: Measurements
}

export interface CompareRow {
  group: 'setting' | 'measurement'
  key: string
  label: string
  a: string
  b: string
  changed: boolean
}

export function compareRows(a: CompareSide, b: CompareSide): CompareRow[] {
  const sa = describeSettings(normaliseSettings(a.settings), a.widthMm)
  const sb = describeSettings(normaliseSettings(b.settings), b.widthMm)
  const rows: CompareRow[] = sa.map((line, i) => ({
    group: 'setting', key: line.key, label: line.label, a: line.value, b: sb[i]!.value, changed: line.value !== sb[i]!.value,
  }))
  const ma = describeMeasurements(a.measurements)
  const mb = describeMeasurements(b.measurements)
  for (let i = 0; i < ma.length; i++) {
    const x = ma[i]!
    const y = mb[i]!
    // Labels can carry a limit ("Small pieces under 1 mm²"); compare values by number where there is one.
    const changed = x.raw !== null && y.raw !== null ? x.raw !== y.raw : x.value !== y.value
    rows.push({ group: 'measurement', key: x.key, label: x.label === y.label ? x.label : `${x.label} / ${y.label}`, a: x.value, b: y.value, changed })
  }
  return rows
}

export interface DiffColours {
  onlyA: [number, number, number]
  /** Drawn as stripes over onlyA, so the two "only" classes differ by more than colour. */
  onlyAStripe: [number, number, number]
  onlyB: [number, number, number]
  both: [number, number, number]
}

export interface DiffResult {
  /** RGBA, transparent where neither has ink. */
  image: Uint8ClampedArray
  onlyA: number
  onlyB: number
  both: number
}

/** Stripe period of the "only in A" class, pixels. */
export const STRIPE_PX = 6

/**
 * Classifies every pixel of two RGBA rasters by ink (alpha ≥ 128): in both, only in A, only
 * in B, in neither; paints the classes and counts them.
 */
export function diffMasks(a: Uint8ClampedArray, b: Uint8ClampedArray, width: number, height: number, colours: DiffColours): DiffResult {
  const n = width * height
  if (a.length < n * 4 || b.length < n * 4) throw new RangeError('Both rasters must be width × height RGBA.')
  const image = new Uint8ClampedArray(n * 4)
  let onlyA = 0
  let onlyB = 0
  let both = 0
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const i = y * width + x
      const inA = a[i * 4 + 3]! >= 128
      const inB = b[i * 4 + 3]! >= 128
      let c: [number, number, number] | null = null
      if (inA && inB) { both++; c = colours.both }
      else if (inA) { onlyA++; c = (x + y) % STRIPE_PX < 2 ? colours.onlyAStripe : colours.onlyA }
      else if (inB) { onlyB++; c = colours.onlyB }
      if (c) {
        image[i * 4] = c[0]
        image[i * 4 + 1] = c[1]
        image[i * 4 + 2] = c[2]
        image[i * 4 + 3] = 255
      }
    }
  }
  return { image, onlyA, onlyB, both }
}

/** Share of all ink (in either) that differs, 0…1. */
/**
 * The raster two outlines are compared on: `longest` pixels wide, each outline drawn at that
 * width from the top left corner, as tall as the taller of the two needs.
 */
export function overlayFrame(outlines: { widthMm: number; heightMm: number }[], longest: number): { width: number; height: number } {
  const aspect = Math.max(...outlines.map((o) => (o.widthMm > 0 ? o.heightMm / o.widthMm : 0)))
  return { width: longest, height: Math.max(1, Math.round(longest * aspect)) }
}

export function changedShare(d: Pick<DiffResult, 'onlyA' | 'onlyB' | 'both'>): number {
  const total = d.onlyA + d.onlyB + d.both
  return total === 0 ? 0 : (d.onlyA + d.onlyB) / total
}

/** Which two revisions to show when the address names none or only one. */
export function defaultPair(numbers: number[], a?: number, b?: number): { a: number | null; b: number | null } {
  const sorted = [...new Set(numbers)].sort((x, y) => y - x)
  const has = (n: number | undefined): n is number => n !== undefined && sorted.includes(n)
  let B = has(b) ? b : null
  let A = has(a) ? a : null
  if (B === null) B = sorted.find((n) => n !== A) ?? null
  if (A === null) A = sorted.find((n) => n !== B && (B === null || n < B)) ?? sorted.find((n) => n !== B) ?? null
  return { a: A, b: B }
}
