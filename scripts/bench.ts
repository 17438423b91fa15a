// `npm run bench`: speed and memory of the outline pipeline on this machine, printed as figures.
// Synthetic phone photos (a drawing under uneven light, noise, JPEG) of 1, 4 and 12 MP at
// 150 mm; per-stage medians; the preview; the event loop's longest pause while 4 revisions run
// at once in the worker pool; peak memory; and our outline stage against Debian's potrace.
import { mkdtempSync, writeFileSync, existsSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { monitorEventLoopDelay, performance } from 'node:perf_hooks'
import sharp from 'sharp'
import Piscina from 'piscina'
import { runPipeline, PREVIEW_SOURCE_SIDE, type RunRequest } from '../server/pipeline/run'
import { prepareBitmap } from '../server/pipeline/prepare'
import { traceBitmap } from '../server/pipeline/trace'
import { besideShell } from './lib/beside'
import { buildPipelineWorker, PIPELINE_WORKER_FILE } from './lib/pipeline-worker-build'
import type { WorkerAnswer } from '../server/pipeline/worker'
import { benchBrowserRoundTrip } from './lib/bench-browser'
import { benchCutSheets } from './lib/bench-cutsheet'
import { benchSheets } from './lib/bench-sheets'
import { benchPlates } from './lib/bench-plates'
import { benchLayeredPlates } from './lib/bench-layered-plates'
import { benchGeometry } from './lib/bench-geometry'
import { benchColour } from './lib/bench-colour'
import { benchCleanup } from './lib/bench-cleanup'
import { benchTrust } from './lib/bench-trust'
import { benchQueue } from './lib/bench-queue'
import { benchSpeed } from './lib/bench-speed'

const RUNS = Number(process.env.BENCH_RUNS ?? 5)
const WIDTH_MM = 150

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2
}
const ms = (x: number) => `${x.toFixed(0).padStart(6)} ms`

/** A drawing photographed on paper: shading across the sheet, a vignette, noise, JPEG. */
async function phonePhoto(megapixels: number): Promise<Buffer> {
  const w = Math.round(Math.sqrt(megapixels * 1e6 * 4 / 3))
  const h = Math.round(w * 3 / 4)
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}">
    <defs><radialGradient id="v" cx="40%" cy="35%" r="80%"><stop offset="0" stop-color="#f3efe6"/><stop offset="1" stop-color="#8d877c"/></radialGradient></defs>
    <rect width="100%" height="100%" fill="url(#v)"/>
    <g fill="#2a2724">
      <circle cx="${w * 0.3}" cy="${h * 0.5}" r="${h * 0.28}"/>
      <rect x="${w * 0.55}" y="${h * 0.2}" width="${w * 0.06}" height="${h * 0.6}"/>
      <rect x="${w * 0.65}" y="${h * 0.2}" width="${w * 0.25}" height="${h * 0.06}"/>
      <path d="M ${w * 0.65} ${h * 0.8} L ${w * 0.9} ${h * 0.35} L ${w * 0.9} ${h * 0.8} Z"/>
    </g>
    <circle cx="${w * 0.3}" cy="${h * 0.5}" r="${h * 0.1}" fill="#e9e4da"/>
  </svg>`
  const base = await sharp(Buffer.from(svg)).raw().toBuffer({ resolveWithObject: true })
  const d = base.data
  let s = 7
  for (let i = 0; i < d.length; i++) {
    s = (s * 1103515245 + 12345) & 0x7fffffff
    d[i] = Math.max(0, Math.min(255, d[i]! + ((s >> 8) % 17) - 8))
  }
  return sharp(d, { raw: base.info }).jpeg({ quality: 88 }).toBuffer()
}

function potraceAvailable(): boolean {
  return existsSync('/usr/bin/potrace')
}

async function main() {
  console.log(`Decalwright pipeline benchmark — ${os.cpus().length} cores, Node ${process.version}, ${RUNS} runs each, ${WIDTH_MM} mm wide\n`)
  const photos = new Map<number, Buffer>()
  for (const mp of [1, 4, 12]) photos.set(mp, await phonePhoto(mp))
  const settings = { lightingEvening: { enabled: true, strength: 1 } }

  console.log('Per-stage medians, one revision at a time (in this thread):')
  console.log('  photo      prepare     trace     clean   measure     total   prepared px')
  for (const [mp, photo] of photos) {
    const runs: Awaited<ReturnType<typeof runPipeline>>[] = []
    for (let i = 0; i < RUNS; i++) runs.push(await runPipeline({ source: photo, settings, widthMm: WIDTH_MM, purpose: 'revision' }))
    const t = (k: keyof (typeof runs)[0]['timings']) => ms(median(runs.map((r) => r.timings[k])))
    const m = runs[0]!.measurements
    console.log(`  ${String(mp).padStart(2)} MP  ${t('prepareMs')} ${t('traceMs')} ${t('cleanMs')} ${t('measureMs')} ${t('totalMs')}   ${m.preparedWidthPx}×${m.preparedHeightPx}`)
  }

  // Outline stage against the reference C tracer on the very same prepared bitmap.
  const twelve = photos.get(12)!
  const prepared = await prepareBitmap(twelve, settings, WIDTH_MM)
  const ours: number[] = []
  traceBitmap(prepared, prepared.settings) // warm-up: let the JIT compile the tracer first
  for (let i = 0; i < RUNS * 2; i++) {
    const t0 = performance.now()
    traceBitmap(prepared, prepared.settings)
    ours.push(performance.now() - t0)
  }
  console.log('\nOutline stage on the 12 MP photo\'s prepared bitmap')
  console.log(`  ours (npm potrace):        ${ms(median(ours))}`)
  if (potraceAvailable()) {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'dw-bench-'))
    const pbm = path.join(dir, 'prepared.pbm')
    // PBM P4: rows padded to whole bytes, 1 = black (ink) (Netpbm format specification).
    const rowBytes = Math.ceil(prepared.width / 8)
    const body = Buffer.alloc(rowBytes * prepared.height)
    for (let y = 0; y < prepared.height; y++) for (let x = 0; x < prepared.width; x++) {
      if (prepared.bitmap[y * prepared.width + x]) body[y * rowBytes + (x >> 3)]! |= 0x80 >> (x & 7)
    }
    writeFileSync(pbm, Buffer.concat([Buffer.from(`P4\n${prepared.width} ${prepared.height}\n`), body]))
    const p = prepared.settings
    const turd = Math.round(p.speckFilterMm2 * prepared.pxPerMm ** 2)
    const theirs: number[] = []
    const beside = besideShell() // not forked from this process: see scripts/lib/beside.ts
    for (let i = 0; i < RUNS; i++) {
      const t0 = performance.now()
      beside.run('/usr/bin/potrace', ['-s', '-t', String(turd), '-a', String(p.cornerRounding), '-O', String(p.curveTolerance), '-o', path.join(dir, 'out.svg'), pbm])
      theirs.push(performance.now() - t0)
    }
    beside.close()
    console.log(`  Debian potrace (C, incl. process start and SVG writing): ${ms(median(theirs))}`)
    console.log(`  ratio ours ÷ Debian:       ${(median(ours) / median(theirs)).toFixed(2)}× (target ≤ 2×)`)
  } else {
    console.log('  Debian potrace is not installed (apt-get install potrace) — no comparison.')
  }

  await benchGeometry(twelve, RUNS)

  // The worker pool as the server uses it.
  // Inside the project, so the worker finds sharp, potrace and svgo in node_modules.
  const dir = path.resolve('node_modules/.cache/decalwright-bench')
  await buildPipelineWorker(dir)
  const pool = new Piscina({ filename: path.join(dir, PIPELINE_WORKER_FILE), maxThreads: os.availableParallelism(), minThreads: os.availableParallelism() })
  const run = async (req: RunRequest) => {
    const a = (await pool.run(req)) as WorkerAnswer
    if (!a.ok) throw new Error(a.message)
    return a.result
  }
  await run({ source: photos.get(1)!, settings, widthMm: WIDTH_MM, purpose: 'preview' }) // warm the threads

  // Preview as the tuning bench calls it: the server keeps a shrunk copy of the source (long
  // side PREVIEW_SOURCE_SIDE, see server/artworks/preview.ts), so each call starts from that.
  const previewSource = await sharp(twelve).autoOrient().resize({ width: PREVIEW_SOURCE_SIDE, height: PREVIEW_SOURCE_SIDE, fit: 'inside' }).png({ compressionLevel: 0 }).toBuffer()
  const previews: number[] = []
  const stages: { prepareMs: number; traceMs: number; cleanMs: number; measureMs: number }[] = []
  for (let i = 0; i < RUNS * 2; i++) {
    const t0 = performance.now()
    const r = await run({ source: previewSource, settings: { ...settings, threshold: { mode: 'manual', value: 100 + i * 5 } }, widthMm: WIDTH_MM, purpose: 'preview', sourceKey: 'bench' })
    previews.push(performance.now() - t0)
    stages.push(r.timings)
  }
  const st = (k: keyof (typeof stages)[0]) => median(stages.map((x) => x[k])).toFixed(0)
  console.log(`\nPreview of the 12 MP photo, source loaded, through the worker pool: median ${ms(median(previews))} (target ≤ 150 ms)`)
  console.log(`  stages: prepare ${st('prepareMs')} ms, trace ${st('traceMs')} ms, clean ${st('cleanMs')} ms, measure ${st('measureMs')} ms`)

  const fullRuns: number[] = []
  for (let i = 0; i < RUNS; i++) {
    const t0 = performance.now()
    await run({ source: twelve, settings, widthMm: WIDTH_MM, purpose: 'revision' })
    fullRuns.push(performance.now() - t0)
  }
  console.log(`12 MP photo to a revision's files through the worker pool: median ${ms(median(fullRuns))} (target ≤ 1.5 s; storing adds a few object-store writes)`)

  // Four revisions at once: how long does this thread (the server's event loop) stall?
  const delay = monitorEventLoopDelay({ resolution: 5 })
  globalThis.gc?.()
  const baseline = process.memoryUsage().rss
  let peak = baseline
  const sampler = setInterval(() => { peak = Math.max(peak, process.memoryUsage().rss) }, 10)
  let longest = 0
  let last = performance.now()
  const ticker = setInterval(() => { const now = performance.now(); longest = Math.max(longest, now - last - 5); last = now }, 5)
  delay.enable()
  const t0 = performance.now()
  await Promise.all([0, 1, 2, 3].map(() => run({ source: twelve, settings, widthMm: WIDTH_MM, purpose: 'revision' })))
  const wall = performance.now() - t0
  delay.disable()
  clearInterval(sampler)
  clearInterval(ticker)
  console.log(`\nFour 12 MP revisions at once: ${ms(wall)} in all`)
  console.log(`  longest event-loop pause: ${(delay.max / 1e6).toFixed(1)} ms (histogram), ${longest.toFixed(1)} ms (timer gap) (target ≤ 50 ms)`)
  console.log(`  peak memory (RSS, this process and its worker threads): ${(peak / 1024 / 1024).toFixed(0)} MB (target ≤ 700 MB); ${(baseline / 1024 / 1024).toFixed(0)} MB of it was there before (the benchmark's own photos and earlier runs)`)
  await pool.destroy()

  await benchCutSheets(RUNS)
  await benchSheets(RUNS)
  await benchPlates(RUNS)
  await benchLayeredPlates(RUNS)
  await benchColour(RUNS)
  await benchCleanup(RUNS)
  await benchTrust()
  await benchQueue(RUNS)
  await benchSpeed(RUNS)

  // The tuning bench, end to end in a real browser (skip with BENCH_BROWSER=0).
  if (process.env.BENCH_BROWSER !== '0') {
    console.log('\nTuning bench preview round trip in Chromium (12 MP photo, 150 mm, the app on its own services):')
    const trips = await benchBrowserRoundTrip(twelve, Math.max(8, RUNS * 3))
    if (typeof trips === 'string') console.log(`  ${trips}`)
    else {
      const p95 = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); return s[Math.min(s.length - 1, Math.ceil(0.95 * s.length) - 1)]! }
      console.log(`  request → outline drawn: median ${ms(median(trips.requestMs))}, 95th percentile ${ms(p95(trips.requestMs))} (n = ${trips.requestMs.length})`)
      console.log(`  let go of the control → outline drawn: median ${ms(median(trips.sinceChangeMs))}, 95th percentile ${ms(p95(trips.sinceChangeMs))}`)
      console.log(`  of which the server's pipeline: median ${ms(median(trips.serverMs))}`)
    }
  }
}

main().catch((err) => {
  console.error(err)
  process.exit(1)
})
