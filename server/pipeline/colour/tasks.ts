// The layered run as tasks (runner.ts strings them together): each of its three steps is a task of its own, so a layered revision
// spreads over a worker pool: one task separates, one task per ink outlines it (these run side
// by side), one task assembles. runColourLayersWith strings the tasks together for any runner
// of tasks (a piscina pool's run, or colourWork called in this thread: runColourLayers).
// worker.ts is the thread entry.
import { PrepareError, TooComplexError } from '../errors'
import {
  assembleLayers, outlineInk, separateSource,
  type AssembledLayers, type ColourSettings, type LayeredRunRequest, type LayeredRunResult, type OutlinedInk, type SeparatedSource,
} from './run-layers'
import { runColourLayersWith } from './runner'

export { ColourTaskError, runColourLayersWith } from './runner'

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

/** The layered run in this thread (the inks' outlines still overlap sharp's threads). */
export function runColourLayers(req: LayeredRunRequest): Promise<LayeredRunResult> {
  return runColourLayersWith(colourWork, req)
}
