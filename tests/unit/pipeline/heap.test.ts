import { spawnSync } from 'node:child_process'
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { pathToFileURL } from 'node:url'
import { describe, expect, it } from 'vitest'
import { PIPELINE_INITIAL_OLD_SPACE_MB } from '../../../server/pipeline/heap'

// In a fresh process (the flags are process-wide): one thread started before
// configurePipelineHeap and one after, each making an upload's worth of short-lived objects
// 80 times over. V8's own --trace-gc lines give the heap size at each thread's first full
// collection (Mark-Compact), told apart by the thread's isolate address.
const CHILD = `
import { Worker } from 'node:worker_threads'
const { configurePipelineHeap } = await import(process.argv[2])
const code = \`
const { parentPort } = require('node:worker_threads')
const live = []
for (let round = 0; round < 80; round++) {
  const batch = []
  for (let j = 0; j < 60000; j++) batch.push({ j, p: [j, j + 1, j + 2] })
  live.push(batch)
  if (live.length > 2) live.shift()
}
parentPort.postMessage('done')
\`
const run = (label) => new Promise((resolve, reject) => {
  const w = new Worker(code, { eval: true })
  w.once('error', reject)
  w.once('message', () => { console.log('thread ' + label); w.terminate().then(resolve) })
})
await run('before')
configurePipelineHeap()
await run('after')
`

/** Heap size (MB) at the first full collection of each thread, in the order the threads ran. */
function firstFullCollections(out: string): { before: number, after: number } {
  const firsts: number[] = []
  const seen = new Set<string>()
  let thread = 0
  for (const line of out.split('\n')) {
    if (line.startsWith('thread ')) { thread++; continue }
    const m = /^\[\d+:(0x[0-9a-f]+)\]\s+\d+ ms: Mark-Compact ([\d.]+) \(/.exec(line)
    if (!m || seen.has(m[1]!)) continue
    seen.add(m[1]!)
    if (firsts.length === thread) firsts.push(Number(m[2]))
  }
  return { before: firsts[0] ?? NaN, after: firsts[1] ?? NaN }
}

describe('the pipeline threads\' heap', () => {
  it('lets the old generation grow to its first limit before a full collection, in threads started after it is set', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'dw-heap-'))
    try {
      const file = path.join(dir, 'child.mjs')
      writeFileSync(file, CHILD)
      const heap = pathToFileURL(path.resolve('server/pipeline/heap.ts')).href
      const r = spawnSync(process.execPath, ['--trace-gc', '--import', 'tsx', file, heap], { encoding: 'utf8', timeout: 60_000 })
      expect(r.status, r.stderr).toBe(0)
      const { before, after } = firstFullCollections(r.stdout)
      // V8 sizes a new thread's first limit from what survives its first young collections:
      // a few tens of MB here. Configured, the first full collection waits for the limit.
      expect(before).toBeLessThan(PIPELINE_INITIAL_OLD_SPACE_MB)
      expect(after).toBeGreaterThanOrEqual(PIPELINE_INITIAL_OLD_SPACE_MB)
    } finally {
      rmSync(dir, { recursive: true, force: true })
    }
  })
})
