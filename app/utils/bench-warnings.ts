// Warnings about a preview or a revision, in the words of people who weed and apply decals.
// Each names the setting that would fix it, so the bench can point at that control.
import type { Measurements } from '#shared/types/pipeline'
import { MEASURE, smallPiecesUnder } from '#shared/glossary'
import { formatNumber } from './format'

/**
 * Until film stock exists, the sheet a design must fit: 300 × 300 mm. A stated default, not a
 * measured one: a common size for adhesive film sheets and within the work area of the small
 * enclosed diode lasers school labs tend to own. A film's own sheet size replaces it later.
 */
export const DEFAULT_SHEET_MM = { width: 300, height: 300 } as const

/**
 * Narrowest stroke that survives weeding on thin adhesive film: about 0.8 mm. Common practice
 * (a rule of thumb among people who weed film by hand), not a measured limit; a film's own
 * "smallest weedable feature" replaces it once film stock exists.
 */
export const MIN_WEEDABLE_STROKE_MM = 0.8

/**
 * Above this many nodes the cut stutters: the laser's controller gets a stream of tiny moves
 * and keeps slowing down between them. Our own rule of thumb (from memory), well below the
 * server's refusal limit (server/pipeline/errors.ts DEFAULT_NODE_CAP).
 */
export const STUTTER_NODES = 20_000

/** Below this fidelity the outline visibly strays from the prepared bitmap (our own choice). */
export const LOW_FIDELITY = 0.95

/** Which control fixes a warning; the bench moves the focus there. */
export type WarningFix = 'speckFilterMm2' | 'widthMm' | 'curveTolerance' | 'cornerRounding' | 'threshold' | 'swapInkAndPaper' | 'thickenToMm'

export interface BenchWarning {
  id: string
  text: string
  fix: WarningFix
  /** The fix's label, for "Go to …" links. */
  fixLabel: string
  /** A fix the bench can make in one click: its button's words and the settings it writes. */
  oneClick?: { label: string; settings: { thickenToMm: number } }
}

export interface WarningContext {
  sheetMm?: { width: number; height: number }
  minStrokeMm?: number
  /** The film the design is checked against; its name replaces "thin film" and "a sheet". */
  filmName?: string
  /** The lab laser's work area, when the program has recorded it. */
  workAreaMm?: { width: number; height: number } | null
}

const FIX_LABELS: Record<WarningFix, string> = {
  speckFilterMm2: 'speck filter',
  widthMm: 'width',
  curveTolerance: 'curve tolerance',
  cornerRounding: 'corner rounding',
  threshold: 'threshold',
  swapInkAndPaper: 'swap ink and paper',
  thickenToMm: 'thin strokes',
}

/** "24,000": a whole number grouped in thousands, as every other page writes it. */
export function groupThousands(n: number): string {
  return formatNumber(Math.round(n), 0)
}

export function formatMmValue(mm: number): string {
  if (mm >= 100) return mm.toFixed(0)
  if (mm >= 10) return Number(mm.toFixed(1)).toString()
  return Number(mm.toFixed(2)).toString()
}

export function benchWarnings(m: Measurements, ctx: WarningContext = {}): BenchWarning[] {
  const sheet = ctx.sheetMm ?? DEFAULT_SHEET_MM
  const minStroke = ctx.minStrokeMm ?? MIN_WEEDABLE_STROKE_MM
  const film = ctx.filmName ?? 'thin film'
  const aSheet = (mm: number) => (ctx.filmName ? `the ${mm} mm sheet of ${ctx.filmName}` : `a ${mm} mm sheet`)
  const out: BenchWarning[] = []
  const add = (id: string, text: string, fix: WarningFix, oneClick?: BenchWarning['oneClick']) => out.push({ id, text, fix, fixLabel: FIX_LABELS[fix], ...(oneClick ? { oneClick } : {}) })

  if (m.pieces === 0) {
    add('empty', 'The outline is empty: nothing in the prepared bitmap counts as ink — move the threshold, or swap ink and paper if the drawing is light on dark', 'threshold')
    return out
  }
  if (m.smallPieces > 0) {
    const n = m.smallPieces
    add('small-pieces', `${n} ${n === 1 ? 'piece is' : 'pieces are'} smaller than ${formatMmValue(m.smallPieceLimitMm2)} mm² and will be lost when weeding — raise the speck filter`, 'speckFilterMm2')
  }
  if (m.narrowestFeatureMm !== null && m.narrowestFeatureMm < minStroke) {
    // Thickening to the film's smallest weedable feature (or the common 0.8 mm) fixes it at this size.
    add('thin-stroke', `The narrowest stroke is ${formatMmValue(m.narrowestFeatureMm)} mm; ${film} tears below about ${formatMmValue(minStroke)} mm when weeding — thicken the thin strokes, or make the decal wider`, 'thickenToMm',
      { label: `Thicken to ${formatMmValue(minStroke)} mm`, settings: { thickenToMm: minStroke } })
  }
  if (m.nodes > STUTTER_NODES) {
    add('many-nodes', `The outline has ${groupThousands(m.nodes)} nodes; the cut will stutter — raise the curve tolerance`, 'curveTolerance')
  }
  if (m.widthMm > sheet.width) {
    add('too-wide', `The design is ${formatMmValue(m.widthMm)} mm wide, wider than ${aSheet(sheet.width)} — reduce the width`, 'widthMm')
  }
  if (m.heightMm > sheet.height) {
    add('too-tall', `The design is ${formatMmValue(m.heightMm)} mm tall, taller than ${aSheet(sheet.height)} — reduce the width (the height follows it)`, 'widthMm')
  }
  const area = ctx.workAreaMm
  // The design may lie either way round on the machine's bed.
  if (area && !((m.widthMm <= area.width && m.heightMm <= area.height) || (m.widthMm <= area.height && m.heightMm <= area.width))) {
    add('beyond-work-area', `The design (${formatMmValue(m.widthMm)} × ${formatMmValue(m.heightMm)} mm) does not fit the laser's ${formatMmValue(area.width)} × ${formatMmValue(area.height)} mm work area, either way round — reduce the width`, 'widthMm')
  }
  if (m.fidelity < LOW_FIDELITY) {
    add('low-fidelity', `The outline matches the prepared bitmap only ${(m.fidelity * 100).toFixed(1)} % — lower the curve tolerance or the corner rounding`, 'curveTolerance')
  }
  return out
}

/** Measurements as labelled read-outs for the bench and the compare view. */
export interface MeasurementLine {
  key: keyof Measurements
  label: string
  value: string
  /** A plain number for comparing two revisions. */
  raw: number | null
}

export function describeMeasurements(m: Measurements): MeasurementLine[] {
  const mm = (v: number) => `${formatMmValue(v)} mm`
  return [
    { key: 'widthMm', label: MEASURE.width, value: mm(m.widthMm), raw: m.widthMm },
    { key: 'heightMm', label: MEASURE.height, value: mm(m.heightMm), raw: m.heightMm },
    { key: 'inkAreaMm2', label: MEASURE.inkArea, value: `${groupThousands(m.inkAreaMm2)} mm²`, raw: Math.round(m.inkAreaMm2) },
    { key: 'cutLengthMm', label: MEASURE.cutLength, value: `${groupThousands(m.cutLengthMm)} mm`, raw: Math.round(m.cutLengthMm) },
    { key: 'pieces', label: MEASURE.pieces, value: String(m.pieces), raw: m.pieces },
    { key: 'holes', label: MEASURE.holes, value: String(m.holes), raw: m.holes },
    { key: 'nodes', label: MEASURE.nodes, value: groupThousands(m.nodes), raw: m.nodes },
    { key: 'narrowestFeatureMm', label: MEASURE.narrowest, value: m.narrowestFeatureMm === null ? 'no ink' : mm(m.narrowestFeatureMm), raw: m.narrowestFeatureMm === null ? null : Number(m.narrowestFeatureMm.toFixed(2)) },
    { key: 'smallPieces', label: smallPiecesUnder(`${formatMmValue(m.smallPieceLimitMm2)} mm²`), value: String(m.smallPieces), raw: m.smallPieces },
    { key: 'fidelity', label: MEASURE.fidelity, value: `${(m.fidelity * 100).toFixed(1)} %`, raw: Number((m.fidelity * 100).toFixed(1)) },
    { key: 'threshold', label: MEASURE.threshold, value: String(m.threshold), raw: m.threshold },
  ]
}
