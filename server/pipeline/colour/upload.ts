// The layered path of a revision made from a source at the automatic settings (an upload, or a
// revision without colour settings of the designer's): a first look at screen resolution finds
// the inks and decides (decide.ts) whether they are layers; if they are, the source is trimmed
// to them and separated at the prepared resolution, the decision is taken again there, and the
// layers are outlined, stacked and framed. Anything else answers 'single', and the caller keeps
// the single-colour pipeline's result, unchanged.
import type { CleanUpChoice } from '../../../shared/types/pipeline'
import type { RevisionColour } from '../../../shared/types/layers'
import { decideLayers, inkBox, type LayerDecision } from './decide'
import { labToHex, type Lab } from './lab'
import type { LayeredRunRequest, LayeredRunResult, SeparatedSource } from './run-layers'
import { DEFAULT_MARKS, DEFAULT_STACK, type StackSettings } from './defaults'
import { distinctNames, separationSentence } from './separate'
import { layersOfSeparation, separateWith } from './runner'
import type { ColourAnswer, ColourTask } from './tasks'

type Layers = Extract<LayeredRunResult, { kind: 'layers' }>

export type LayeredUpload =
  | { kind: 'single', why: string }
  | { kind: 'layers', result: Layers, colour: RevisionColour }

/** Paper kept round the inks when trimming to them, in pixels of the first look. */
const TRIM_PAD_PX = 2

/** The inks of each group as one ink (a union of masks; the colour their shares' mean), named anew. */
export function groupInks(sep: SeparatedSource, groups: number[][]): SeparatedSource {
  const mean = (g: number[]): Lab => {
    const w = g.reduce((s, i) => s + sep.inks[i]!.share, 0) || 1
    const sum = (k: keyof Lab) => g.reduce((s, i) => s + sep.inks[i]!.lab[k] * sep.inks[i]!.share, 0) / w
    return { l: sum('l'), a: sum('a'), b: sum('b') }
  }
  const labs = groups.map((g) => (g.length === 1 ? sep.inks[g[0]!]!.lab : mean(g)))
  const names = distinctNames(labs)
  const inks = groups.map((g, k) => {
    const mask = g.length === 1 ? sep.inks[g[0]!]!.mask : new Uint8Array(sep.width * sep.height)
    if (g.length > 1) for (const i of g) { const m = sep.inks[i]!.mask; for (let p = 0; p < m.length; p++) if (m[p]) mask[p] = 1 }
    return {
      name: names[k]!, lab: labs[k]!, hex: g.length === 1 ? sep.inks[g[0]!]!.hex : labToHex(labs[k]!),
      from: g.flatMap((i) => sep.inks[i]!.from), share: g.reduce((s, i) => s + sep.inks[i]!.share, 0), mask,
    }
  })
  // Stack order as separated: lightest first.
  const order = inks.map((_, i) => i).sort((a, b) => labs[b]!.l - labs[a]!.l)
  const sorted = order.map((i) => inks[i]!)
  const merged = groups.reduce((s, g) => s + g.length - 1, 0)
  const dropped = sep.inks.length - groups.reduce((s, g) => s + g.length, 0)
  return {
    ...sep,
    inks: sorted,
    separation: { ...sep.separation, sentence: separationSentence(sorted.map((i) => i.name), sep.separation.paper, { merged, dropped }) },
  }
}

/** The box round every kept ink of the first look, padded, as fractions; and the inks' own width as a share of it. */
export function trimOf(look: SeparatedSource, groups: number[][]): { trim: NonNullable<LayeredRunRequest['trim']>, inkShareOfWidth: number } | null {
  const { width, height } = look
  let x0 = width, y0 = height, x1 = -1, y1 = -1
  for (const i of groups.flat()) {
    const b = inkBox(look.inks[i]!.mask, width, height)
    if (!b) continue
    x0 = Math.min(x0, b.x0); y0 = Math.min(y0, b.y0); x1 = Math.max(x1, b.x1); y1 = Math.max(y1, b.y1)
  }
  if (x1 < 0) return null
  const inkW = x1 - x0 + 1
  const a = Math.max(0, x0 - TRIM_PAD_PX), b = Math.max(0, y0 - TRIM_PAD_PX)
  const c = Math.min(width, x1 + 1 + TRIM_PAD_PX), d = Math.min(height, y1 + 1 + TRIM_PAD_PX)
  return { trim: { x: a / width, y: b / height, width: (c - a) / width, height: (d - b) / height }, inkShareOfWidth: inkW / (c - a) }
}

function colourRecord(result: Layers, decision: LayerDecision, req: LayeredRunRequest, trim: LayeredRunRequest['trim']): RevisionColour {
  const asked = req.colour?.stack ?? DEFAULT_STACK
  const stackOf = (i: number): StackSettings => (Array.isArray(asked) ? asked[i] ?? DEFAULT_STACK : asked)
  return {
    sentence: result.separation.sentence,
    inks: result.layers.map((l) => ({ name: l.name, hex: l.hex, share: l.share })),
    stack: result.layers.map((_, i) => ({ mode: stackOf(i).mode, overlapMm: stackOf(i).overlapMm })),
    marks: (req.colour?.marks ?? DEFAULT_MARKS).enabled,
    frame: {
      widthMm: result.frame.widthMm, heightMm: result.frame.heightMm,
      drawingWidthMm: result.layers[0]!.measurements.widthMm, drawingHeightMm: result.layers[0]!.measurements.heightMm,
      shift: result.frame.shift, marks: result.frame.marks.map((m) => ({ x: m.x, y: m.y })),
    },
    trim: trim ?? null,
    detail: {
      found: result.separation.found.map((f) => ({ name: f.name, hex: f.hex })),
      paper: { hex: result.separation.paper.hex, tint: result.separation.paper.tint },
      why: decision.why,
    },
  }
}

/**
 * The layered path for a source whose single-colour clean-up chose `choices` (or will: the
 * first look runs meanwhile). `req` asks for the revision (purpose 'revision', no trim):
 * `req.widthMm` is the drawing's width.
 */
export async function layeredUpload(run: (task: ColourTask) => Promise<ColourAnswer>, req: LayeredRunRequest, cleanUp: CleanUpChoice[] | Promise<CleanUpChoice[]>): Promise<LayeredUpload> {
  const t0 = performance.now()
  const [look, choices] = await Promise.all([separateWith(run, { ...req, purpose: 'preview', trim: undefined }), cleanUp])
  const first = decideLayers(look.inks, look.width, look.height, choices)
  if (!first.layered) return { kind: 'single', why: first.why }
  // Trimmed to the inks (unless the designer cropped), so the width asked is the drawing's.
  const box = req.settings.crop ? null : trimOf(look, first.groups)
  const full = await separateWith(run, box ? { ...req, trim: box.trim, widthMm: req.widthMm / box.inkShareOfWidth } : req)
  const decision = decideLayers(full.inks, full.width, full.height, choices)
  if (!decision.layered) return { kind: 'single', why: decision.why }
  const result = await layersOfSeparation(run, req, groupInks(full, decision.groups), t0)
  return { kind: 'layers', result, colour: colourRecord(result, decision, req, box?.trim) }
}
