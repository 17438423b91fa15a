// Entry of the pipeline worker threads (piscina). Tracing is CPU-bound: it runs here so the
// server's event loop keeps answering while a revision is made.
import sharp from 'sharp'
import { runPipeline, type RunRequest, type RunResult } from './run'
import { NotADrawingError, PrepareError, TooComplexError } from './errors'
import { colourWork, type ColourAnswer, type ColourTask } from './colour/tasks'

// Each worker thread is already one core's worth of work: libvips' own thread pool and its
// operation cache would only add memory (peak memory with four revisions at once). Both
// settings are process-wide, so the server's own small sharp jobs run single-threaded too.
sharp.concurrency(1)
sharp.cache(false)

export type WorkerAnswer =
  | { ok: true; result: RunResult }
  | { ok: false; kind: 'prepare' | 'too-complex' | 'not-a-drawing' | 'settings' | 'internal'; message: string }

/** A colour layer's task (colour/tasks.ts) carries its kind; a single-colour run has none. */
function isColourTask(req: RunRequest | ColourTask): req is ColourTask {
  return 'kind' in req
}

export default async function work(req: RunRequest | ColourTask): Promise<WorkerAnswer | ColourAnswer> {
  // The same threads take the colour layers' tasks, so one pool serves both.
  if (isColourTask(req)) return colourWork(req)
  try {
    return { ok: true, result: await runPipeline(req) }
  } catch (err) {
    // Errors cross the thread boundary as plain data, with the kind the route maps to a status.
    if (err instanceof TooComplexError) return { ok: false, kind: 'too-complex', message: err.message }
    if (err instanceof NotADrawingError) return { ok: false, kind: 'not-a-drawing', message: err.message }
    if (err instanceof PrepareError) return { ok: false, kind: 'prepare', message: err.message }
    if (err instanceof RangeError) return { ok: false, kind: 'settings', message: err.message }
    if ((err as { name?: string }).name === 'ZodError') return { ok: false, kind: 'settings', message: 'The settings are not valid.' }
    return { ok: false, kind: 'internal', message: (err as Error).message ?? String(err) }
  }
}
