// Cut sheets are built off the request thread, in worker threads of their own (a 200-copy
// sheet of a detailed drawing is a few hundred milliseconds of work and tens of megabytes).
import Piscina from 'piscina'
import { createError } from 'h3'
import { packCurves } from '../cutsheet/curve-buffer'
import type { CutSheetAnswer, CutSheetRequest, VectorBatchInput } from '../cutsheet/worker'
import { platformConfig } from './config'
import { ServiceUnavailable } from './faults'
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

type RunOptions = NonNullable<Parameters<Piscina['run']>[1]>
// piscina infers its transfer list's type from MessagePort.postMessage's last overload (the
// options object) under Node 20's types; at run time it is the list of buffers to hand over.
const transferring = (buffers: ArrayBuffer[]): RunOptions => ({ transferList: buffers as unknown as RunOptions['transferList'] })

type Answer<K extends CutSheetRequest['kind']> = Extract<CutSheetAnswer, { kind: K; ok: true }>['result']

/** Runs one request in a worker thread; input it cannot make a sheet of becomes a 422. */
async function inPool<R extends CutSheetRequest>(req: R, options?: RunOptions): Promise<Answer<R['kind']>> {
  let answer: CutSheetAnswer
  try {
    answer = await useCutSheetPool().run(req, options)
  } catch (err) {
    if ((err as Error).message?.includes('Task queue is at limit')) throw createError({ statusCode: 503, message: 'The cut sheet workers are busy. Try again in a moment.' })
    throw err
  }
  if (answer.ok && answer.kind === req.kind) return answer.result as Answer<R['kind']>
  if (!answer.ok && answer.kind === 'settings') throw createError({ statusCode: 422, message: answer.message })
  if (!answer.ok && answer.kind === 'store') throw new ServiceUnavailable('file store', new Error(answer.message))
  throw new Error(`cut sheet failed: ${answer.ok ? 'unexpected answer' : answer.message}`)
}

/**
 * Builds a batch's sheets, SVG and DXF as bytes. The curves cross into the thread packed in
 * typed arrays whose buffers are handed over, not cloned object by object on this thread.
 */
export function buildSheetsInPool(input: Extract<CutSheetRequest, { kind: 'batch' }>['input']) {
  const designs = input.designs.map(({ curves, ...d }) => ({ ...d, packed: packCurves(curves) }))
  return inPool({ kind: 'batch-packed', input: { ...input, designs } }, transferring(designs.map((d) => d.packed.buffer as ArrayBuffer)))
}

/**
 * Builds a batch's sheets from the designs' stored clean vectors: the bytes cross into the
 * thread unread (a stored file's bytes are in shared memory), and the thread reads the curves.
 */
export function buildSheetsFromVectorsInPool(input: VectorBatchInput) {
  return inPool({ kind: 'batch-vectors', input }, handingVectors(input))
}

/**
 * Builds a batch's sheets from the designs' stored clean vectors and has the thread store
 * every sheet's SVG and DXF under `prefix` (see keptSheetKey); answers the sheets' figures.
 * The files' bytes never reach this thread.
 */
export function keepSheetsFromVectorsInPool(input: VectorBatchInput, prefix: string) {
  const { s3, s3TimeoutMs } = platformConfig()
  return inPool({ kind: 'keep-vectors', input, keep: { prefix, store: { s3, s3TimeoutMs } } }, handingVectors(input))
}

// Only a buffer the view owns whole is handed over: a small Buffer may share Node's pool slab.
function handingVectors(input: VectorBatchInput): RunOptions | undefined {
  const handed = input.designs.map((d) => d.vector)
    .filter((v) => v.buffer instanceof ArrayBuffer && v.byteOffset === 0 && v.byteLength === v.buffer.byteLength).map((v) => v.buffer as ArrayBuffer)
  return handed.length ? transferring(handed) : undefined
}

/** Where the copies go, without the files. */
export function packInPool(input: Extract<CutSheetRequest, { kind: 'pack' }>['input']) {
  return inPool({ kind: 'pack', input })
}
