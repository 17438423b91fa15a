// The layered run as tasks: each of its three steps is a task of its own, so a layered revision
// spreads over a worker pool: one task separates, one task per ink outlines it (these run side
// by side), one task assembles. runColourLayersWith strings the tasks together for any runner
// of tasks (a piscina pool's run, or colourWork called in this thread: runColourLayers).
// worker.ts is the thread entry.
import sharp from 'sharp'
import { PrepareError, TooComplexError } from '../errors'
import {
  assembleLayers, outlineInk, separateSource,
  type AssembledLayers, type ColourSettings, type LayeredRunRequest, type LayeredRunResult, type OutlinedInk, type SeparatedSource,
} from './run-layers'
import { ENGINE_VERSIONS_BASE } from '../versions'

export type ColourTask =
  | { kind: 'separate', req: LayeredRunRequest }
  | { kind: 'outline', mask: Uint8Array, width: number, height: number, pxPerMm: number, settings: LayeredRunRequest['settings'], purpose: LayeredRunRequest['purpose'] }
  | { kind: 'assemble', sep: SeparatedSource, outlined: OutlinedInk[], colour?: Partial<ColourSettings>, smallPieceMm2?: number }

export type ColourAnswer =
  | { ok: true, kind: 'separate', result: SeparatedSource }
  | { ok: true, kind: 'outline', result: OutlinedInk }
  | { ok: true, kind: 'assemble', result: AssembledLayers }
  | { ok: false, kind: 'prepare' | 'too-complex' | 'settings' | 'internal', message: string }

export async function colourWork(task: ColourTask): Promise<ColourAnswer> {
  try {
    if (task.kind === 'separate') return { ok: true, kind: 'separate', result: await separateSource(task.req) }
    if (task.kind === 'outline') return { ok: true, kind: 'outline', result: await outlineInk(task.mask, task.width, task.height, task.pxPerMm, task.settings, task.purpose) }
    return { ok: true, kind: 'assemble', result: assembleLayers(task.sep, task.outlined, task.colour, task.smallPieceMm2) }
  } catch (err) {
    return errorAnswer(err)
  }
}

/**
 * An error as plain data that crosses a thread boundary, with the kind a route maps to a status
 * (the single-colour worker, server/pipeline/worker.ts, maps the same way and can use this).
 */
export function errorAnswer(err: unknown): { ok: false, kind: 'prepare' | 'too-complex' | 'settings' | 'internal', message: string } {
  if (err instanceof TooComplexError) return { ok: false, kind: 'too-complex', message: err.message }
  if (err instanceof PrepareError) return { ok: false, kind: 'prepare', message: err.message }
  if (err instanceof RangeError) return { ok: false, kind: 'settings', message: err.message }
  if ((err as { name?: string }).name === 'ZodError') return { ok: false, kind: 'settings', message: 'The settings are not valid.' }
  return { ok: false, kind: 'internal', message: (err as Error).message ?? String(err) }
}

export class ColourTaskError extends Error {
  constructor(readonly kind: Exclude<ColourAnswer, { ok: true }>['kind'], message: string) { super(message) }
}

interface TaskResults { separate: SeparatedSource, outline: OutlinedInk, assemble: AssembledLayers }

function unwrap<K extends ColourTask['kind']>(a: ColourAnswer, kind: K): TaskResults[K] {
  if (!a.ok) throw new ColourTaskError(a.kind, a.message)
  if (a.kind !== kind) throw new Error(`Expected a ${kind} answer, got ${a.kind}.`)
  return a.result as TaskResults[K]
}

type Run = (task: ColourTask) => Promise<ColourAnswer>
type Layers = Extract<LayeredRunResult, { kind: 'layers' }>

/** Step 1 through a runner of tasks. */
export async function separateWith(run: Run, req: LayeredRunRequest): Promise<SeparatedSource> {
  return unwrap(await run({ kind: 'separate', req }), 'separate')
}

/** Steps 2 and 3 through a runner of tasks, for a separation already made (two inks or more): the inks are outlined side by side. */
export async function layersOfSeparation(run: Run, req: LayeredRunRequest, sep: SeparatedSource, t0 = performance.now()): Promise<Layers> {
  const { decodeMs, separateMs } = sep.timings
  const outlined = await Promise.all(sep.inks.map(async (ink) => unwrap(await run({
    kind: 'outline', mask: ink.mask, width: sep.width, height: sep.height, pxPerMm: sep.pxPerMm, settings: req.settings, purpose: req.purpose,
  }), 'outline')))
  // The assembly needs no masks: leave them here rather than copy them to a thread again.
  const light: SeparatedSource = { ...sep, inks: sep.inks.map((i) => ({ ...i, mask: new Uint8Array(0) })) }
  const assembled = unwrap(await run({ kind: 'assemble', sep: light, outlined, colour: req.colour, smallPieceMm2: req.smallPieceMm2 }), 'assemble')
  const sum = (k: keyof OutlinedInk['timings']) => outlined.reduce((s, o) => s + o.timings[k], 0)
  return {
    kind: 'layers',
    separation: sep.separation,
    layers: assembled.layers,
    stackedSvg: assembled.stackedSvg,
    frame: assembled.frame,
    pxPerMm: sep.pxPerMm,
    timings: { decodeMs, separateMs, traceMs: sum('traceMs'), cleanMs: sum('cleanMs'), stackMs: assembled.stackMs, measureMs: sum('measureMs'), totalMs: performance.now() - t0 },
    engineVersions: { ...ENGINE_VERSIONS_BASE, sharp: sharp.versions.sharp ?? '', vips: sharp.versions.vips },
  }
}

/**
 * A layered run through a runner of tasks: `run` hands a task to a worker (e.g. a piscina
 * pool's run) and resolves with its answer. The inks are outlined side by side.
 */
export async function runColourLayersWith(run: Run, req: LayeredRunRequest): Promise<LayeredRunResult> {
  const t0 = performance.now()
  const sep = await separateWith(run, req)
  const { decodeMs, separateMs } = sep.timings
  if (sep.inks.length <= 1) {
    return { kind: 'single', separation: sep.separation, timings: { decodeMs, separateMs, traceMs: 0, cleanMs: 0, stackMs: 0, measureMs: 0, totalMs: performance.now() - t0 } }
  }
  return layersOfSeparation(run, req, sep, t0)
}

/** The layered run in this thread (the inks' outlines still overlap sharp's threads). */
export function runColourLayers(req: LayeredRunRequest): Promise<LayeredRunResult> {
  return runColourLayersWith(colourWork, req)
}
