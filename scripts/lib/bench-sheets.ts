// `npm run bench`, the operator's sheets as the server builds them: a 200-copy sheet of a
// 3,500-node drawing (kerf, text labels, weeding lines), SVG and DXF, through the server's own
// cut sheet pool (server/platform/cutsheet-pool.ts) and its worker bundled as the Nitro hook
// bundles it; the event loop's longest pause meanwhile, also as the server keeps a set (the
// thread stores the files itself, in a store in another process); and what stays on the request thread
// (laying the copies out for the page and the content key). Times are printed beside a floor
// measured in the same run: copying the finished files' bytes once.
import { spawn } from 'node:child_process'
import { createHash } from 'node:crypto'
import { mkdtempSync, rmSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { once } from 'node:events'
import { monitorEventLoopDelay, performance } from 'node:perf_hooks'
import Piscina from 'piscina'
import { packCurves } from '../../server/cutsheet/curve-buffer'
import { curvePathData } from '../../server/cutsheet/design'
import { readCleanVectorAt } from '../../server/cutsheet/path'
import { packBatch } from '../../server/cutsheet/pack'
import type { CutSheetRequest } from '../../server/cutsheet/worker'
import type { BatchSheetInput } from '../../server/cutsheet/sheet'
import { detailedDrawing, median } from './bench-cutsheet'
import { buildCutSheetWorker } from './pipeline-worker-build'
import { configurePlatform } from '../../server/platform/config'

/**
 * The local object store (s3rver) in a process of its own, as a real store is: the bytes it
 * receives must not be counted as this thread's pauses.
 */
async function storeElsewhere(bucket: string): Promise<{ endpoint: string; stop: () => void }> {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'decalwright-bench-sheets-'))
  const code = `const { default: S3rver } = await import('s3rver');
    const s = new S3rver({ port: 0, address: '127.0.0.1', directory: ${JSON.stringify(dir)}, silent: true, configureBuckets: [{ name: ${JSON.stringify(bucket)}, configs: [] }] });
    const a = await s.run(); console.log(a.port)`
  const child = spawn(process.execPath, ['--input-type=module', '-e', code], { cwd: process.cwd(), stdio: ['ignore', 'pipe', 'inherit'] })
  // Never left running: stopped with this process whatever happens to the bench.
  const kill = () => child.kill()
  process.once('exit', kill)
  const [line] = await once(child.stdout!, 'data') as [Buffer]
  return {
    endpoint: `http://127.0.0.1:${Number(line.toString().trim())}`,
    stop: () => { process.off('exit', kill); child.kill(); rmSync(dir, { recursive: true, force: true }) },
  }
}

const COPIES = 200
const TARGET_SHEET_MS = 300
const TARGET_PAUSE_MS = 20

const ms = (x: number) => `${x.toFixed(1).padStart(7)} ms`

/** Runs `work` `runs` times one after another: each run's wall time, and the event loop's longest pause meanwhile (ns). */
async function pausesWhile(runs: number, work: (i: number) => Promise<unknown>): Promise<{ walls: number[]; pause: { max: number } }> {
  const pause = monitorEventLoopDelay({ resolution: 1 })
  const walls: number[] = []
  pause.enable()
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now()
    await work(i)
    walls.push(performance.now() - t0)
  }
  pause.disable()
  return { walls, pause }
}

export async function benchSheets(runs: number): Promise<void> {
  const drawing = detailedDrawing()
  const input: BatchSheetInput = {
    designs: [{ id: 'J1', curves: drawing.curves, widthMm: drawing.widthMm, heightMm: drawing.heightMm, count: COPIES, labels: Array.from({ length: COPIES }, (_, i) => `1-${i + 1}`) }],
    sheetWidthMm: 600, sheetHeightMm: 400, gapMm: 3, marginMm: 5, kerfMm: 0.15, labels: { mode: 'text' }, weedingLines: { spacingMm: 25, clearanceMm: 1 },
  }
  console.log(`\nThe operator's sheets through the server's pool: ${COPIES} copies of a ${drawing.nodes}-node drawing, kerf 0.15 mm, text labels, weeding lines (targets ≤ ${TARGET_SHEET_MS} ms a sheet, pause ≤ ${TARGET_PAUSE_MS} ms)`)
  // The worker file exactly as the server's build makes it, found where the pool looks. The
  // server's pool hands the curves over packed in a typed array (server/cutsheet/curve-buffer.ts).
  process.env.DECALWRIGHT_CUTSHEET_WORKER = await buildCutSheetWorker(path.resolve('node_modules/.cache/decalwright-bench'))
  const { buildSheetsInPool } = await import('../../server/platform/cutsheet-pool')
  const first = await buildSheetsInPool(structuredClone(input)) // starts the thread
  const sheet = first.sheets[0]!
  if (first.sheets.length !== 1 || sheet.copies !== COPIES) throw new Error(`expected ${COPIES} copies on one sheet, got ${first.sheets.map((s) => s.copies).join(' + ')}`)

  const floor: number[] = []
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now()
    Buffer.from(sheet.svg!); Buffer.from(sheet.dxf!)
    floor.push(performance.now() - t0)
  }
  const f = Math.max(median(floor), 0.01)

  const idle = monitorEventLoopDelay({ resolution: 1 })
  idle.enable()
  await new Promise((resolve) => setTimeout(resolve, 400 * runs))
  idle.disable()

  const { walls, pause: delay } = await pausesWhile(runs, () => buildSheetsInPool(input))

  // As before the curves were packed: the same request with the curves as objects, cloned one by
  // one on this thread into a pool of the same worker file, for the side-by-side figures.
  const objects = new Piscina({ filename: process.env.DECALWRIGHT_CUTSHEET_WORKER, maxThreads: 1, minThreads: 1 })
  await objects.run({ kind: 'batch', input } satisfies CutSheetRequest)
  const { walls: clonedWalls, pause: cloned } = await pausesWhile(runs, () => objects.run({ kind: 'batch', input } satisfies CutSheetRequest))
  await objects.destroy()

  // Medians of work on this thread.
  const timed = (work: () => unknown) => {
    const t: number[] = []
    for (let i = 0; i < runs; i++) {
      const t0 = performance.now()
      work()
      t.push(performance.now() - t0)
    }
    return median(t)
  }
  // What handing the curves over costs this thread: a structured clone of the objects, or packing them.
  const cloneMs = timed(() => structuredClone(input.designs[0]!.curves))
  const packMs = timed(() => packCurves(input.designs[0]!.curves))
  // The server's own path: the stored clean vector's bytes go to the thread, which reads them.
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${drawing.widthMm}mm" height="${drawing.heightMm}mm" viewBox="0 0 ${drawing.widthMm} ${drawing.heightMm}"><path d="${drawing.curves.map(curvePathData).join('')}"/></svg>`
  const vector = new TextEncoder().encode(svg)
  const readMs = timed(() => readCleanVectorAt(vector, drawing.widthMm))
  const { buildSheetsFromVectorsInPool } = await import('../../server/platform/cutsheet-pool')
  const fromVectors = { ...input, designs: input.designs.map(({ curves: _c, heightMm: _h, ...d }) => ({ ...d, vector: Uint8Array.from(vector) })) }
  const { walls: servedWalls, pause: served } = await pausesWhile(runs, () => buildSheetsFromVectorsInPool({ ...fromVectors, designs: fromVectors.designs.map((d) => ({ ...d, vector: Uint8Array.from(d.vector) })) }))

  // As the server keeps a set: the thread builds the files and stores them itself (in a store
  // in another process); only the sheets' figures come back to this thread.
  const store = await storeElsewhere('bench')
  configurePlatform({ databaseUrl: '', smtpUrl: '', mailFrom: '', mailOutboxDir: '', baseUrl: '', s3: { endpoint: store.endpoint, region: 'us-east-1', bucket: 'bench', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', forcePathStyle: true } })
  const { keepSheetsFromVectorsInPool } = await import('../../server/platform/cutsheet-pool')
  const keep = (i: number) => keepSheetsFromVectorsInPool({ ...fromVectors, designs: fromVectors.designs.map((d) => ({ ...d, vector: Uint8Array.from(d.vector) })) }, `cut-sheets/bench-${i}/`)
  let measured: Awaited<ReturnType<typeof pausesWhile>>
  try {
    await keep(-1)
    measured = await pausesWhile(runs, keep)
  } finally {
    store.stop()
  }
  const { walls: keptWalls, pause: kept } = measured

  // On the request thread: the content key of a download (all a kept sheet costs besides
  // reading it back), and the job or batch page's layout (boxes only).
  const boxes = { ...input, designs: input.designs.map(({ curves: _c, ...d }) => d) }
  const keyMs = timed(() => createHash('sha256').update(JSON.stringify(boxes)).digest('hex'))
  const layoutMs = timed(() => packBatch(boxes))
  // The pages ask the pool for it instead: how long the page waits, and the pause meanwhile.
  const { packInPool } = await import('../../server/platform/cutsheet-pool')
  const { walls: inPool, pause: paused } = await pausesWhile(runs, () => packInPool(boxes))

  console.log(`  files: SVG ${(sheet.svg!.byteLength / 1024).toFixed(0)} KiB, DXF ${(sheet.dxf!.byteLength / 1024 / 1024).toFixed(1)} MiB; floor (copy both once): ${ms(f)}`)
  console.log(`  a sheet, request to bytes in the pool: median ${ms(median(walls))} (${(median(walls) / f).toFixed(0)}× floor)`)
  console.log(`  longest event-loop pause meanwhile, with the files' bytes coming back to this thread: ${(delay.max / 1e6).toFixed(1)} ms (idle floor ${(idle.max / 1e6).toFixed(1)} ms; ${(delay.max / Math.max(idle.max, 1)).toFixed(2)}× idle)`)
  console.log(`  as the server keeps a set, the thread building and storing the files (in a store in another process) and only figures coming back: a sheet built and stored ${ms(median(keptWalls))} (${(median(keptWalls) / f).toFixed(0)}× floor), longest pause ${(kept.max / 1e6).toFixed(1)} ms (${(kept.max / Math.max(idle.max, 1)).toFixed(2)}× idle) — the pause target`)
  console.log(`  the same with the curves as objects (as before): a sheet ${ms(median(clonedWalls))} (${(median(clonedWalls) / f).toFixed(0)}× floor), longest pause ${(cloned.max / 1e6).toFixed(1)} ms (${(cloned.max / Math.max(idle.max, 1)).toFixed(2)}× idle)`)
  console.log(`  from the stored vector's bytes handed over and read in the thread, the files back as bytes: a sheet ${ms(median(servedWalls))} (${(median(servedWalls) / f).toFixed(0)}× floor), longest pause ${(served.max / 1e6).toFixed(1)} ms (${(served.max / Math.max(idle.max, 1)).toFixed(2)}× idle); reading that vector here instead (as before) ${ms(readMs)}`)
  console.log(`  handing the curves over, on this thread: cloned as objects ${ms(cloneMs)} (${(cloneMs / f).toFixed(2)}× floor), packed into a typed array ${ms(packMs)} (${(packMs / f).toFixed(2)}× floor)`)
  console.log(`  a download's content key, on the request thread: ${ms(keyMs)} (${(keyMs / f).toFixed(2)}× floor)`)
  console.log(`  the page's layout: ${ms(layoutMs)} in this thread (${(layoutMs / f).toFixed(2)}× floor); asked of the pool as the server does, ${ms(median(inPool))}, longest pause meanwhile ${(paused.max / 1e6).toFixed(1)} ms`)
}
