// Strings the colour layers' tasks (tasks.ts) together for any runner of tasks: a piscina
// pool's run on the server, or colourWork called in this thread. Only types come from the
// pipeline's modules, so the server can import this without the tracer and svgo, which live in
// the worker threads.
import type { LayeredRunRequest, LayeredRunResult, OutlinedInk, SeparatedSource, AssembledLayers } from './run-layers'
import type { ColourAnswer, ColourTask } from './tasks'

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
    engineVersions: assembled.engineVersions,
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
