// Cut sheets are built off the request thread, in worker threads of their own (a 200-copy
// sheet of a detailed drawing is a few hundred milliseconds of work and tens of megabytes).
import Piscina from 'piscina'
import { createError } from 'h3'
import type { CutSheetAnswer, CutSheetRequest } from '../cutsheet/worker'
import { workerPath } from './pipeline-pool'

const WORKER_FILE = 'cutsheet-worker.mjs'
let pool: Piscina | undefined

function useCutSheetPool(): Piscina {
  pool ??= new Piscina({
    filename: workerPath(WORKER_FILE, process.env.DECALWRIGHT_CUTSHEET_WORKER),
    // One thread: sheets are asked for one at a time at the laser, and the outline pipeline
    // needs the cores more; requests beyond it wait in the queue.
    maxThreads: 1,
    minThreads: 0,
    idleTimeout: 60_000,
    maxQueue: 32,
  })
  return pool
}

type Answer<K extends CutSheetRequest['kind']> = Extract<CutSheetAnswer, { kind: K; ok: true }>['result']

/** Runs one request in a worker thread; input it cannot make a sheet of becomes a 422. */
async function inPool<R extends CutSheetRequest>(req: R): Promise<Answer<R['kind']>> {
  let answer: CutSheetAnswer
  try {
    answer = await useCutSheetPool().run(req)
  } catch (err) {
    if ((err as Error).message?.includes('Task queue is at limit')) throw createError({ statusCode: 503, message: 'The cut sheet workers are busy. Try again in a moment.' })
    throw err
  }
  if (answer.ok && answer.kind === req.kind) return answer.result as Answer<R['kind']>
  if (!answer.ok && answer.kind === 'settings') throw createError({ statusCode: 422, message: answer.message })
  throw new Error(`cut sheet failed: ${answer.ok ? 'unexpected answer' : answer.message}`)
}

/** Builds a batch's sheets, SVG and DXF as bytes. */
export function buildSheetsInPool(input: Extract<CutSheetRequest, { kind: 'batch' }>['input']) {
  return inPool({ kind: 'batch', input })
}

/** Where the copies go, without the files. */
export function packInPool(input: Extract<CutSheetRequest, { kind: 'pack' }>['input']) {
  return inPool({ kind: 'pack', input })
}
