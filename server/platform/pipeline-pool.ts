import { existsSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import Piscina from 'piscina'
import { createError } from 'h3'
import type { RunRequest, RunResult } from '../pipeline/run'
import type { WorkerAnswer } from '../pipeline/worker'
import type { ColourAnswer, ColourTask } from '../pipeline/colour/tasks'
import { configurePipelineHeap } from '../pipeline/heap'

const WORKER_FILE = 'pipeline-worker.mjs'
let pool: Piscina | undefined

/** A worker thread's bundled entry, next to the built server (or in .nuxt under nuxt dev). */
export function workerPath(file: string, env?: string): string {
  const candidates = [
    env,
    process.argv[1] ? path.join(path.dirname(process.argv[1]), file) : undefined, // next to .output/server/index.mjs
    path.resolve('.output/server', file),
    path.resolve('.nuxt', file), // nuxt dev
  ].filter((c): c is string => !!c)
  const found = candidates.find((c) => existsSync(c))
  if (!found) throw new Error(`The worker (${file}) was not found; was the app built? Looked in: ${candidates.join(', ')}`)
  return found
}

function usePipelinePool(): Piscina {
  if (!pool) configurePipelineHeap() // before its threads start
  pool ??= new Piscina({
    filename: workerPath(WORKER_FILE, process.env.DECALWRIGHT_PIPELINE_WORKER),
    // One thread per core: tracing is CPU-bound; more threads only share the same cores.
    maxThreads: Math.max(1, os.availableParallelism()),
    minThreads: 1,
    idleTimeout: 60_000,
    // Requests beyond this wait in the queue; a flood is refused rather than exhausting memory.
    maxQueue: 64,
  })
  return pool
}

/** Runs the pipeline off the request thread; pipeline errors become clear 4xx answers. */
export async function runInPool(req: RunRequest, signal?: AbortSignal): Promise<RunResult> {
  let answer: WorkerAnswer
  try {
    answer = await usePipelinePool().run(req, signal ? { signal } : undefined)
  } catch (err) {
    if (signal?.aborted) throw createError({ statusCode: 499, message: 'The request was withdrawn.' })
    if ((err as Error).message?.includes('Task queue is at limit')) {
      throw createError({ statusCode: 503, message: 'The outline workers are busy. Try again in a moment.' })
    }
    throw err
  }
  if (answer.ok) return answer.result
  switch (answer.kind) {
    case 'too-complex': throw createError({ statusCode: 422, message: answer.message, data: { setting: 'speckFilterMm2' } })
    case 'prepare': throw createError({ statusCode: 422, message: answer.message })
    case 'not-a-drawing': throw createError({ statusCode: 422, message: answer.message, data: { kind: 'not-a-drawing' } })
    case 'settings': throw createError({ statusCode: 400, message: answer.message })
    default: throw new Error(`pipeline failed: ${answer.message}`)
  }
}

/** Runs one task of the colour layers (server/pipeline/colour/tasks.ts) in the same pool; its answer is the caller's to read. */
export async function runColourInPool(task: ColourTask): Promise<ColourAnswer> {
  try {
    return await usePipelinePool().run(task)
  } catch (err) {
    if ((err as Error).message?.includes('Task queue is at limit')) {
      throw createError({ statusCode: 503, message: 'The outline workers are busy. Try again in a moment.' })
    }
    throw err
  }
}
