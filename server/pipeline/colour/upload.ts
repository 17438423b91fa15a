// The layered path of a revision made from a source at the automatic settings (an upload, or a
// revision without colour settings of the designer's): a first look at screen resolution finds
// the inks and decides (decide.ts) whether they are layers; if they are, the source is trimmed
// to them and separated at the prepared resolution, the decision is taken again there, and the
// layers are outlined, stacked and framed. Anything else answers 'single', and the caller keeps
// the single-colour pipeline's result, unchanged.
import type { CleanUpChoice } from '../../../shared/types/pipeline'
import type { RevisionColour } from '../../../shared/types/layers'
import type { ColourSettings } from '../../../shared/utils/colour-settings'
import { decideLayers, inkBox, MIN_LAYER_SHARE, type LayerDecision } from './decide'
import { deltaE00, labToHex, type Lab } from './lab'
import type { ColourSettings as RunColourSettings, LayeredRunRequest, LayeredRunResult, SeparatedSource } from './run-layers'
import { DEFAULT_MARKS, DEFAULT_STACK, type StackSettings } from './defaults'
import { distinctNames, separationSentence } from './separate'
import { layersOfSeparation, separateWith } from './runner'
import { straightens, withCleanUpFrame } from './straighten'
import { parseSettings } from '../../../shared/utils/settings'
import type { ColourAnswer, ColourTask } from './tasks'

type Layers = Extract<LayeredRunResult, { kind: 'layers' }>

export type LayeredUpload =
  | { kind: 'single', why: string, found?: FoundOnLook[] }
  | { kind: 'layers', result: Layers, colour: RevisionColour, found?: FoundOnLook[] }

/** An ink of the bench's first look, which the designer's merges, drops and order index. */
export interface FoundOnLook { name: string, hex: string, share: number, lab: Lab, tooSmall: boolean }

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

/** Inks this near in colour (CIEDE2000) to an ink of the first look are that ink (our setting: well past the separation's own joining distance). */
const SAME_INK_DE00 = 20

/**
 * The first look's layers on the full separation: each of its inks joins the layer (or the
 * leaving out) of the look's ink nearest in colour, when within SAME_INK_DE00; an ink the look
 * did not see keeps the group the full separation's own decision gives it (`fresh`).
 */
export function followLook(full: SeparatedSource, look: SeparatedSource, lookGroups: number[][], fresh: number[][]): number[][] {
  const out = lookGroups.map((): number[] => [])
  const own = new Map<number, number[]>()
  full.inks.forEach((ink, j) => {
    let nearest = -1, best = SAME_INK_DE00
    look.inks.forEach((l, i) => { const d = deltaE00(l.lab, ink.lab); if (d <= best) { best = d; nearest = i } })
    if (nearest >= 0) {
      const g = lookGroups.findIndex((grp) => grp.includes(nearest))
      if (g >= 0) out[g]!.push(j)
      return
    }
    const f = fresh.findIndex((grp) => grp.includes(j))
    if (f >= 0) own.set(f, [...(own.get(f) ?? []), j])
  })
  return [...out, ...own.values()].filter((g) => g.length > 0)
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

function colourRecord(result: Layers, decision: Pick<LayerDecision, 'why'>, req: LayeredRunRequest, trim: LayeredRunRequest['trim']): RevisionColour {
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
    straightened: straightens(parseSettings(req.settings)),
    detail: {
      found: result.separation.found.map((f) => ({ name: f.name, hex: f.hex })),
      paper: { hex: result.separation.paper.hex, tint: result.separation.paper.tint },
      why: decision.why,
    },
  }
}

type Run = (task: ColourTask) => Promise<ColourAnswer>

/**
 * The first look at the source (at screen resolution, untrimmed), and the request on the frame
 * the one-colour clean-up chose: the look starts at once on the settings as given; when the
 * clean-up straightened the photo from corners it found, the request pins those corners
 * (straighten.ts) and the look is taken again on the straightened sheet, so every separation
 * after it reads the same frame as the one-colour drawing.
 */
async function lookOnFrame(run: Run, req: LayeredRunRequest, cleanUp: CleanUpChoice[] | Promise<CleanUpChoice[]>, colour?: Partial<RunColourSettings>) {
  const lookOf = (r: LayeredRunRequest) => separateWith(run, { ...r, ...(colour ? { colour } : {}), purpose: 'preview', trim: undefined })
  const first = lookOf(req)
  // Awaited below, or dropped when the frame changes: never an unhandled refusal.
  first.catch(() => undefined)
  const choices = await cleanUp
  const settings = withCleanUpFrame(req.settings, choices)
  if (settings === req.settings) return { look: await first, req }
  const framed = { ...req, settings }
  return { look: await lookOf(framed), req: framed }
}

/**
 * The layered path for a source whose single-colour clean-up chose `choices` (or will: the
 * first look runs meanwhile). `req` asks for the revision (purpose 'revision', no trim):
 * `req.widthMm` is the drawing's width.
 */
export async function layeredUpload(run: Run, asked: LayeredRunRequest, cleanUp: CleanUpChoice[] | Promise<CleanUpChoice[]>): Promise<LayeredUpload> {
  const t0 = performance.now()
  const { look, req } = await lookOnFrame(run, asked, cleanUp)
  const first = decideLayers(look.inks, look.width, look.height)
  if (!first.layered) return { kind: 'single', why: first.why }
  // Trimmed to the inks (unless the designer cropped), so the width asked is the drawing's.
  const box = req.settings.crop ? null : trimOf(look, first.groups)
  const { sep: full, trim } = await separateTrimmed(run, req, box)
  // The inks found again at full resolution keep the first look's decision (a stray blend at
  // the edge of an ink joins that ink); one the look did not see is judged on its own.
  const fresh = decideLayers(full.inks, full.width, full.height)
  const groups = followLook(full, look, first.groups, fresh.groups)
  const decision = { ...first, groups, layered: groups.length >= 2 }
  if (!decision.layered) return { kind: 'single', why: fresh.why }
  const result = await layersOfSeparation(run, req, groupInks(full, groups), t0)
  return { kind: 'layers', result, colour: colourRecord(result, decision, req, trim) }
}

/** The layers bottom first in the order asked (a permutation of their indices), or as separated. */
export function reorderInks(sep: SeparatedSource, order: number[] | null): SeparatedSource {
  if (!order || order.length !== sep.inks.length || new Set(order).size !== order.length || order.some((i) => !sep.inks[i])) return sep
  return { ...sep, inks: order.map((i) => sep.inks[i]!) }
}

/** The pipeline's colour settings for the designer's: the picks and count only (merges and drops are ours to apply, see lookGroups), a stack entry per layer, the marks on or off. */
function runColour(asked: ColourSettings, layers: number): Partial<RunColourSettings> {
  return {
    choices: { count: asked.count, picks: asked.picks },
    stack: Array.from({ length: Math.max(1, layers) }, (_, i) => asked.stack[i] ?? DEFAULT_STACK),
    marks: { ...DEFAULT_MARKS, enabled: asked.marks },
  }
}

/**
 * The layers the designer's merges and drops make of the look's inks: groups of indices, in
 * the order of their first member. Inks under MIN_LAYER_SHARE of the ink are left out as on
 * upload, unless merged into another.
 */
export function lookGroups(look: SeparatedSource, asked: Pick<ColourSettings, 'merge' | 'drop'>): number[][] {
  const n = look.inks.length
  const parent = Array.from({ length: n }, (_, i) => i)
  const root = (i: number): number => (parent[i] === i ? i : (parent[i] = root(parent[i]!)))
  for (const [a, b] of asked.merge) if (a < n && b < n) { const ra = root(a), rb = root(b); parent[Math.max(ra, rb)] = Math.min(ra, rb) }
  const all = look.inks.reduce((s, i) => s + i.share, 0) || 1
  const groups = new Map<number, number[]>()
  for (let i = 0; i < n; i++) groups.set(root(i), [...(groups.get(root(i)) ?? []), i])
  return [...groups.values()].filter((g) => !g.some((i) => asked.drop.includes(i)) && (g.length > 1 || look.inks[g[0]!]!.share / all >= MIN_LAYER_SHARE))
}

/** The same layers on another separation of the source: each of its inks joins the layer of the look's ink nearest in colour (CIEDE2000), or is left out with it. */
export function mapGroups(full: SeparatedSource, look: SeparatedSource, groups: number[][]): number[][] {
  const out = groups.map((): number[] => [])
  full.inks.forEach((ink, j) => {
    let nearest = 0, best = Infinity
    look.inks.forEach((l, i) => { const d = deltaE00(l.lab, ink.lab); if (d < best) { best = d; nearest = i } })
    const g = groups.findIndex((grp) => grp.includes(nearest))
    if (g >= 0) out[g]!.push(j)
  })
  return out.filter((g) => g.length > 0)
}

/** The look's masks cut to the box of its kept inks, the resolution set so that they span `widthMm`. */
type Trim = NonNullable<LayeredRunRequest['trim']>

/** A separation's masks cut to a box (fractions of its picture), at the resolution given; the box as cut, to whole pixels. */
export function cropSeparation(sep: SeparatedSource, trim: Trim, pxPerMm: number): { sep: SeparatedSource, trim: Trim } {
  const x0 = Math.round(trim.x * sep.width), y0 = Math.round(trim.y * sep.height)
  const w = Math.min(sep.width - x0, Math.round(trim.width * sep.width)), h = Math.min(sep.height - y0, Math.round(trim.height * sep.height))
  const inks = sep.inks.map((ink) => {
    const mask = new Uint8Array(w * h)
    for (let y = 0; y < h; y++) mask.set(ink.mask.subarray((y0 + y) * sep.width + x0, (y0 + y) * sep.width + x0 + w), y * w)
    return { ...ink, mask }
  })
  return { sep: { ...sep, inks, width: w, height: h, pxPerMm }, trim: { x: x0 / sep.width, y: y0 / sep.height, width: w / sep.width, height: h / sep.height } }
}

/** The look trimmed to its kept inks, the resolution set so that they span `widthMm`. */
function trimLook(look: SeparatedSource, groups: number[][], widthMm: number) {
  const box = trimOf(look, groups)
  if (!box) return { box: null, trimmed: look }
  const w = Math.round(box.trim.width * look.width)
  return { box, trimmed: cropSeparation(look, box.trim, (w * box.inkShareOfWidth) / widthMm).sep }
}

/**
 * The source separated at the prepared resolution of the drawing's width, the whole picture
 * (the paper round the drawing is what tells the paper's shading from a large fill of ink),
 * then cut to the box of the inks the look found.
 */
async function separateTrimmed(run: Run, req: LayeredRunRequest, box: ReturnType<typeof trimOf>): Promise<{ sep: SeparatedSource, trim: Trim | undefined }> {
  if (!box) return { sep: await separateWith(run, req), trim: undefined }
  const full = await separateWith(run, { ...req, trim: undefined, widthMm: req.widthMm / (box.inkShareOfWidth * box.trim.width) })
  return cropSeparation(full, box.trim, full.pxPerMm)
}

/**
 * The layers as the designer set them on the bench: a first look at screen resolution finds
 * the inks (what the bench lists, and what the merges, drops and order refer to); a count of
 * 1, or one ink left, is one colour. A preview draws the look, trimmed to its inks; a revision
 * separates the source again at the prepared resolution, trimmed the same way, and gives each
 * ink it finds the fate of the look's ink nearest in colour. `cleanUp` are the one-colour
 * clean-up's choices for the same source and settings: a photo it straightened is separated on
 * the straightened sheet.
 */
export async function layersAsAsked(run: Run, given: LayeredRunRequest, asked: ColourSettings, cleanUp: CleanUpChoice[] | Promise<CleanUpChoice[]> = []): Promise<LayeredUpload> {
  const t0 = performance.now()
  if (asked.count === 1) return { kind: 'single', why: 'One colour, as the designer asked.' }
  const { look, req } = await lookOnFrame(run, given, cleanUp, runColour(asked, 0))
  const all = look.inks.reduce((s, i) => s + i.share, 0) || 1
  const found: FoundOnLook[] = look.inks.map((i) => ({ name: i.name, hex: i.hex, share: i.share, lab: i.lab, tooSmall: i.share / all < MIN_LAYER_SHARE }))
  const groups = lookGroups(look, asked)
  if (groups.length < 2) return { kind: 'single', why: 'One ink left after the designer\'s choices: one colour.', found }
  const { box, trimmed } = req.settings.crop ? { box: null, trimmed: look } : trimLook(look, groups, req.widthMm)
  let sep: SeparatedSource
  let trim = box?.trim
  if (req.purpose === 'preview') {
    sep = groupInks(trimmed, groups)
  } else {
    const cut = await separateTrimmed(run, { ...req, colour: runColour(asked, 0) }, box)
    trim = cut.trim
    sep = groupInks(cut.sep, mapGroups(cut.sep, look, groups))
  }
  if (sep.inks.length < 2) return { kind: 'single', why: 'One ink left after the designer\'s choices: one colour.', found }
  // Said as the designer sees it: merges and drops of the inks the bench listed.
  const changes = { merged: groups.reduce((n, g) => n + g.length - 1, 0), dropped: look.inks.length - groups.flat().length }
  sep = { ...sep, separation: { ...sep.separation, sentence: separationSentence(sep.inks.map((i) => i.name), sep.separation.paper, changes) } }
  const ordered = reorderInks(sep, asked.order)
  const withStack = { ...req, colour: runColour(asked, ordered.inks.length) }
  const result = await layersOfSeparation(run, withStack, ordered, t0)
  return { kind: 'layers', result, found, colour: { ...colourRecord(result, { why: 'As the designer set the colours on the bench.' }, withStack, trim), asked } }
}
