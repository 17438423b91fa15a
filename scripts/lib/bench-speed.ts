// `npm run bench`, the speed targets in one place, each a ratio to a floor measured in the same
// run (or a figure where the target is one), with the target beside it:
//  - upload → the revision's files (prepared PNG, raw outline, clean vector, measurements) ÷
//    the floor of sharp decoding the same photo + Debian's potrace on the same prepared bitmap
//    + svgo on potrace's SVG, at 1, 4 and 12 MP (target ≤ 1.8×): at upload defaults (every
//    automatic step on, what a student gets) and with the analysis' choices pinned (the
//    automatic steps a clean scan does not need, skipped); in a process with the pipeline
//    threads' heap (server/pipeline/heap.ts);
//  - the prepare stage ÷ sharp decoding and resizing the photo to the prepared size;
//  - the trace stage ÷ Debian's potrace on a text page and on 2,000 dots (target ≤ 2×), and
//    on the text page and the 4 MP upload's drawing after a full garbage collection;
//  - the measurements of the 12 MP upload's revision (target ≤ 100 ms);
//  - peak memory (RSS) of four 48 MP uploads at 400 mm made together through the worker pool,
//    as the server makes them, in a process of its own (target ≤ 1 GB);
//  - the tuning bench's preview, the source loaded (target ≤ 150 ms median).
// Run alone with `npx tsx --tsconfig tsconfig.tools.json scripts/lib/bench-speed.ts`; the upload
// figure alone with `… bench-speed.ts --upload` (about a minute with BENCH_RUNS=5).
import { spawnSync } from 'node:child_process'
import v8 from 'node:v8'
import vm from 'node:vm'
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'
import Piscina from 'piscina'
import sharp from 'sharp'
import { optimize } from 'svgo'
import { cleanVector, SVGO_CONFIG } from '../../server/pipeline/clean'
import { configurePipelineHeap, PIPELINE_HEAP_FLAGS } from '../../server/pipeline/heap'
import { measureOutline } from '../../server/pipeline/measure'
import { prepareDrawing } from '../../server/pipeline/prepare'
import { PREVIEW_SOURCE_SIDE, runPipeline } from '../../server/pipeline/run'
import { traceBitmap, traceParameters } from '../../server/pipeline/trace'
import type { WorkerAnswer } from '../../server/pipeline/worker'
import { dots, potraceRunner, sideBySide, textPage } from './bench-geometry'
import { besideShell } from './beside'
import { buildPipelineWorker, PIPELINE_WORKER_FILE } from './pipeline-worker-build'

const POTRACE = '/usr/bin/potrace'
const WIDTH_MM = 150

const middle = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2
}
const fmt = (x: number) => `${x.toFixed(0).padStart(5)} ms`
const verdict = (ok: boolean) => (ok ? 'met' : 'MISSED')

async function clock(f: () => unknown): Promise<number> {
  const t0 = performance.now()
  await f()
  return performance.now() - t0
}

/**
 * A student's drawing (lettering, a badge, a gear, hatching) on a sheet photographed under a
 * lamp: light falling off from one corner, grain, JPEG. `megapixels` at 4:3.
 */
export async function drawingPhoto(megapixels: number): Promise<Buffer> {
  const w = Math.round(Math.sqrt((megapixels * 1e6 * 4) / 3)), h = Math.round((w * 3) / 4)
  let hatch = ''
  for (let i = 0; i < 14; i++) hatch += `M${0.62 * w + i * 0.018 * w} ${0.58 * h}l${0.05 * w} ${0.3 * h}`
  let teeth = ''
  for (let i = 0; i < 12; i++) teeth += `<rect x="${-0.02 * w}" y="${-0.16 * h}" width="${0.04 * w}" height="${0.06 * h}" transform="rotate(${i * 30})"/>`
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}">
    <defs><radialGradient id="lamp" cx="25%" cy="20%" r="95%"><stop offset="0" stop-color="#f4f1ea"/><stop offset="1" stop-color="#9a948a"/></radialGradient></defs>
    <rect width="100%" height="100%" fill="url(#lamp)"/>
    <g fill="#26231f" stroke="#26231f">
      <text x="${0.12 * w}" y="${0.2 * h}" font-family="DejaVu Sans" font-weight="bold" font-size="${0.09 * h}" stroke="none">TEAM 0042</text>
      <g transform="translate(${0.3 * w} ${0.55 * h})"><circle r="${0.13 * h}"/>${teeth}<circle r="${0.05 * h}" fill="#ece8df" stroke="none"/></g>
      <path d="${hatch}" fill="none" stroke-width="${0.004 * w}"/>
      <path d="M${0.55 * w} ${0.3 * h}q${0.1 * w} ${-0.1 * h} ${0.3 * w} 0t${0 * w} ${0.15 * h}" fill="none" stroke-width="${0.012 * w}"/>
    </g></svg>`
  const { data, info } = await sharp(Buffer.from(svg)).removeAlpha().raw().toBuffer({ resolveWithObject: true })
  let seed = 99
  for (let i = 0; i < data.length; i++) {
    seed = (Math.imul(seed, 1664525) + 1013904223) >>> 0
    const v = data[i]! + ((seed >>> 24) % 13) - 6
    data[i] = v < 0 ? 0 : v > 255 ? 255 : v
  }
  return sharp(data, { raw: info }).jpeg({ quality: 90 }).toBuffer()
}

/** 1-bit bitmap (1 = ink) as PBM P4: rows padded to whole bytes, 1 = black (Netpbm format specification). */
function pbm(bitmap: Uint8Array, width: number, height: number): Buffer {
  const rowBytes = Math.ceil(width / 8)
  const bits = Buffer.alloc(rowBytes * height)
  for (let y = 0; y < height; y++) for (let x = 0; x < width; x++) if (bitmap[y * width + x]) bits[y * rowBytes + (x >> 3)]! |= 0x80 >> (x & 7)
  return Buffer.concat([Buffer.from(`P4\n${width} ${height}\n`), bits])
}

type UploadFigure = { mp: number; ratio: number; pinnedRatio: number }

/**
 * uploadAgainstFloor in a process of its own whose heap is the pipeline threads' (heap.ts: V8
 * reads the flags when it makes a heap, so they cannot be set for this thread now).
 */
function uploadInChild(runs: number): UploadFigure[] {
  const child = spawnSync(process.execPath, [...PIPELINE_HEAP_FLAGS, '--import', 'tsx', fileURLToPath(import.meta.url), '--upload-child'],
    { encoding: 'utf8', maxBuffer: 1 << 20, env: { ...process.env, BENCH_RUNS: String(runs) } })
  const lines = child.stdout.trimEnd().split('\n')
  if (child.status !== 0) {
    console.log(`  Upload → the revision's files: the child process failed: ${child.stderr.trim().split('\n').slice(-3).join(' ')}`)
    return []
  }
  console.log(lines.slice(0, -1).join('\n'))
  return JSON.parse(lines.at(-1)!) as UploadFigure[]
}

/**
 * Where the time goes, drawn: one character per 4 ms, each part in its own letter (its name's
 * first), and a bar at the target (1.8 × the floor) so the gap shows at a glance.
 */
function partBars(label: string, names: string[], medians: Record<string, number>, targetMs: number): string {
  const CELL_MS = 4
  let bar = ''
  for (const name of names) bar += name[0]!.repeat(Math.max(1, Math.round(medians[name]! / CELL_MS)))
  const mark = Math.round(targetMs / CELL_MS)
  const drawn = bar.length > mark ? `${bar.slice(0, mark)}|${bar.slice(mark)}` : `${bar.padEnd(mark)}|`
  const total = names.reduce((sum, n) => sum + medians[n]!, 0)
  return `         ${label.padEnd(6)}${drawn}  ${total.toFixed(0)} ms: ${names.map((n) => `${n} ${medians[n]!.toFixed(0)}`).join(' · ')}`
}

/** Upload → revision files ÷ (decode + Debian potrace + svgo), interleaved run by run. */
async function uploadAgainstFloor(runs: number): Promise<UploadFigure[]> {
  console.log(`  Upload → the revision's files ÷ the floor (sharp decode + Debian potrace + svgo on the same input), ${WIDTH_MM} mm, in one thread with the pipeline threads' heap (${PIPELINE_HEAP_FLAGS.join(' ')}; target ≤ 1.8×):`)
  console.log('    under each size, the medians of the parts drawn, 4 ms a character, | at the target (1.8 × the floor):')
  const out: UploadFigure[] = []
  const dir = mkdtempSync(path.join(os.tmpdir(), 'dw-bench-speed-'))
  // Potrace runs from a shell beside this process: a fork here would charge the next run of
  // ours with a page fault on every page it writes (beside.ts).
  const beside = besideShell()
  try {
    for (const mp of [1, 4, 12]) {
      const photo = await drawingPhoto(mp)
      const first = await runPipeline({ source: photo, settings: {}, widthMm: WIDTH_MM, purpose: 'revision' }) // also the warm-up
      const prepared = await prepareDrawing(photo, {}, WIDTH_MM)
      const pinned = Object.fromEntries(first.choices.filter((c) => c.setting !== 'marginMm').map((c) => [c.setting, c.value]))
      const input = path.join(dir, 'in.pbm'), output = path.join(dir, 'out.svg')
      writeFileSync(input, pbm(prepared.bitmap, prepared.width, prepared.height))
      const p = traceParameters(prepared.settings, prepared.pxPerMm)
      const parts: Record<string, number[]> = {}
      const part = (name: string, ms: number) => (parts[name] ??= []).push(ms)
      const floor = async () => {
        const t0 = performance.now()
        await sharp(photo).raw().toBuffer()
        const t1 = performance.now()
        beside.run(POTRACE, ['-s', '-t', String(p.turdSize), '-a', String(p.alphaMax), '-O', String(p.optTolerance), '-o', output, input])
        const t2 = performance.now()
        optimize(readFileSync(output, 'utf8'), SVGO_CONFIG)
        part('decode', t1 - t0); part('Debian potrace', t2 - t1); part('svgo', performance.now() - t2)
      }
      const ours: number[] = [], pins: number[] = [], floors: number[] = [], ratios: number[] = [], pinRatios: number[] = []
      const prep: number[] = [], prepFloor: number[] = []
      for (let i = 0; i < runs; i++) {
        let r: Awaited<ReturnType<typeof runPipeline>> | undefined
        let a = 0, f = 0, b = 0
        // Each goes first in turn: what one leaves behind (a full collection due, libvips' and
        // the compiler's state) falls on each of the others alike.
        const turns = [
          async () => { a = await clock(async () => { r = await runPipeline({ source: photo, settings: {}, widthMm: WIDTH_MM, purpose: 'revision' }) }) },
          async () => { f = await clock(floor) },
          async () => { b = await clock(() => runPipeline({ source: photo, settings: pinned, widthMm: WIDTH_MM, purpose: 'revision' })) },
        ]
        for (let k = 0; k < turns.length; k++) await turns[(i + k) % turns.length]!()
        prep.push(r!.timings.prepareMs)
        part('prepare', r!.timings.prepareMs); part('trace', r!.timings.traceMs); part('clean', r!.timings.cleanMs); part('measure', r!.timings.measureMs)
        prepFloor.push(await clock(() => sharp(photo).autoOrient().resize({ width: prepared.width }).raw().toBuffer()))
        ours.push(a); pins.push(b); floors.push(f); ratios.push(a / f); pinRatios.push(b / f)
      }
      const ratio = middle(ratios), pinnedRatio = middle(pinRatios)
      out.push({ mp, ratio, pinnedRatio })
      console.log(`    ${String(mp).padStart(2)} MP: upload defaults ${fmt(middle(ours))}  ${ratio.toFixed(2)}× ${verdict(ratio <= 1.8)};`
        + ` choices pinned ${fmt(middle(pins))}  ${pinnedRatio.toFixed(2)}× ${verdict(pinnedRatio <= 1.8)};  floor ${fmt(middle(floors))}`
        + `  (prepared ${prepared.width}×${prepared.height} px, ${first.measurements.nodes} nodes; prepare stage ${fmt(middle(prep))} = ${(middle(prep) / middle(prepFloor)).toFixed(2)}× sharp decode-and-resize)`)
      const medians = Object.fromEntries(Object.entries(parts).map(([k, v]) => [k, middle(v)]))
      console.log(partBars('floor', ['decode', 'Debian potrace', 'svgo'], medians, middle(floors) * 1.8))
      console.log(partBars('ours', ['prepare', 'trace', 'clean', 'measure'], medians, middle(floors) * 1.8))
    }
  } finally {
    beside.close()
    rmSync(dir, { recursive: true, force: true })
  }
  return out
}

/** Child process: four 48 MP uploads at 400 mm made together through the pipeline pool; peak RSS. */
async function memoryChild(files: string[]): Promise<void> {
  const dir = path.resolve('node_modules/.cache/decalwright-bench-speed')
  await buildPipelineWorker(dir)
  const n = os.availableParallelism()
  configurePipelineHeap() // as the server's pool does
  const pool = new Piscina({ filename: path.join(dir, PIPELINE_WORKER_FILE), maxThreads: n, minThreads: n })
  const sources = files.map((f) => new Uint8Array(readFileSync(f)))
  globalThis.gc?.()
  const before = process.memoryUsage().rss
  let peak = before
  const sampler = setInterval(() => { peak = Math.max(peak, process.memoryUsage().rss) }, 5)
  const t0 = performance.now()
  const answers = await Promise.all(sources.map((source) => pool.run({ source, settings: {}, widthMm: 400, purpose: 'revision' }) as Promise<WorkerAnswer>))
  const wallMs = performance.now() - t0
  clearInterval(sampler)
  await pool.destroy()
  const failed = answers.find((a) => !a.ok)
  if (failed && !failed.ok) throw new Error(failed.message)
  const maxRss = process.resourceUsage().maxRSS * 1024
  process.stdout.write(JSON.stringify({ peakMb: Math.max(peak, maxRss) / 2 ** 20, beforeMb: before / 2 ** 20, wallMs, sourceMb: sources.reduce((s, b) => s + b.length, 0) / 2 ** 20 }))
}

async function memoryOf48(): Promise<number | null> {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'dw-bench-speed-48-'))
  try {
    const photo = await drawingPhoto(48)
    const files = [0, 1, 2, 3].map((i) => path.join(dir, `photo-${i}.jpg`))
    for (const f of files) writeFileSync(f, photo)
    const child = spawnSync(process.execPath, ['--expose-gc', '--import', 'tsx', fileURLToPath(import.meta.url), '--memory', ...files], { encoding: 'utf8', maxBuffer: 1 << 20 })
    if (child.status !== 0) {
      console.log(`  Four 48 MP uploads at 400 mm: the child process failed: ${child.stderr.trim().split('\n').slice(-3).join(' ')}`)
      return null
    }
    const r = JSON.parse(child.stdout) as { peakMb: number; beforeMb: number; wallMs: number; sourceMb: number }
    console.log(`  Four 48 MP uploads at 400 mm made together through the pipeline pool (${os.availableParallelism()} threads): peak RSS ${r.peakMb.toFixed(0)} MB ${verdict(r.peakMb <= 1024)} (target ≤ 1 GB);`
      + ` ${r.beforeMb.toFixed(0)} MB before they started (Node, the pool, ${r.sourceMb.toFixed(0)} MB of JPEGs); ${(r.wallMs / 1000).toFixed(1)} s in all`)
    return r.peakMb
  } finally {
    rmSync(dir, { recursive: true, force: true })
  }
}

/** A full garbage collection on demand (V8's gc, exposed at run time), or null where it cannot be. */
function collector(): (() => void) | null {
  try {
    v8.setFlagsFromString('--expose-gc')
    return vm.runInNewContext('gc') as () => void
  } catch {
    return null
  }
}

export async function benchSpeed(runs: number): Promise<void> {
  // The absolute targets (measurements, preview) move with the machine's load; the ratios less so.
  console.log(`\nSpeed targets (scripts/lib/bench-speed.ts), ratios to floors measured in this run, medians; load average ${os.loadavg()[0]!.toFixed(1)} on ${os.availableParallelism()} cores:`)
  if (!existsSync(POTRACE)) {
    console.log('  Debian potrace is not installed (apt-get install potrace): the floors need it.')
    return
  }
  const uploads = uploadInChild(runs)

  console.log('  Trace stage ÷ Debian potrace on the same bitmap (incl. its process start and SVG output; target ≤ 2×):')
  const settings = { speckFilterMm2: 0.5, cornerRounding: 1, curveTolerance: 0.2 }
  const traces: number[] = []
  for (const [name, make] of [['text page, A4 at 10 px/mm', textPage], ['2,000 dots, 200 mm at 10 px/mm', dots]] as const) {
    const b = await make()
    traceBitmap(b, settings) // warm-up
    const potrace = potraceRunner(b)
    const t = sideBySide(runs, () => traceBitmap(b, settings), potrace.run)
    potrace.done()
    traces.push(t.ratio)
    console.log(`    ${name.padEnd(32)} ours ${fmt(t.ours)}  potrace ${fmt(t.floor)}  ${t.ratio.toFixed(2)}× ${verdict(t.ratio <= 2)}`)
  }
  // As between two uploads: a full collection first (the uploads' image buffers bring one or
  // two each). Code that V8 keeps only while its closures live is gone after it.
  const fullGc = collector()
  if (fullGc) {
    const upload = await prepareDrawing(await drawingPhoto(4), {}, WIDTH_MM)
    for (const [name, b] of [['text page', await textPage()], ['the 4 MP upload\'s drawing', upload]] as const) {
      const potrace = potraceRunner(b)
      const t = sideBySide(runs, () => { fullGc(); const t0 = performance.now(); traceBitmap(b, settings); return performance.now() - t0 }, potrace.run)
      potrace.done()
      console.log(`    ${name.padEnd(32)} after a full collection (as between uploads; its own time left out): ours ${fmt(t.ours)}  potrace ${fmt(t.floor)}  ${t.ratio.toFixed(2)}× ${verdict(t.ratio <= 2)}`)
    }
  }

  const photo = await drawingPhoto(12)
  const prepared = await prepareDrawing(photo, {}, WIDTH_MM)
  const clean = cleanVector(traceBitmap(prepared, prepared.settings))
  measureOutline(clean, prepared, 1) // warm-up
  const m: number[] = [], geometry: number[] = [], fidelity: number[] = [], narrowest: number[] = []
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now()
    const r = measureOutline(clean, prepared, 1)
    m.push(performance.now() - t0)
    geometry.push(r.timings.geometryMs); fidelity.push(r.timings.fidelityMs); narrowest.push(r.timings.narrowestMs)
  }
  // Each part's own median: the parts of one run would not match the median run.
  const parts = `geometry ${middle(geometry).toFixed(0)}, fidelity ${middle(fidelity).toFixed(0)}, narrowest ${middle(narrowest).toFixed(0)} ms`
  console.log(`  Measurements of the 12 MP upload's revision (${prepared.width}×${prepared.height} px): ${fmt(middle(m))} ${verdict(middle(m) <= 100)} (target ≤ 100 ms; medians: ${parts})`)

  await memoryOf48()

  const previewSource = await sharp(photo).resize({ width: PREVIEW_SOURCE_SIDE, height: PREVIEW_SOURCE_SIDE, fit: 'inside' }).png({ compressionLevel: 0 }).toBuffer()
  const preview = (i: number) => runPipeline({
    source: previewSource, widthMm: WIDTH_MM, purpose: 'preview', sourceKey: 'bench-speed',
    settings: i % 2 ? { threshold: { mode: 'manual', value: 110 + (i % 6) * 6 } } : { curveTolerance: 0.2 + (i % 5) * 0.05 },
  })
  await preview(0) // reads the sheet; later previews start from it, as the server's do
  const previews: number[] = []
  for (let i = 1; i <= Math.max(10, runs * 3); i++) previews.push(await clock(() => preview(i)))
  const pv = middle(previews)
  console.log(`  Tuning bench preview of the 12 MP photo, source loaded, in this thread: median ${fmt(pv)} of ${previews.length} ${verdict(pv <= 150)} (target ≤ 150 ms)`)
  console.log(`  Summary: upload ${uploads.map((u) => `${u.mp} MP ${u.ratio.toFixed(2)}× (pinned ${u.pinnedRatio.toFixed(2)}×)`).join(', ')}; trace ${traces.map((t) => `${t.toFixed(2)}×`).join(', ')}; measurements ${middle(m).toFixed(0)} ms; preview ${pv.toFixed(0)} ms`)
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  const files = process.argv.slice(3)
  const runs = Number(process.env.BENCH_RUNS ?? 5)
  const work = process.argv[2] === '--memory'
    ? memoryChild(files)
    : process.argv[2] === '--upload-child'
      ? uploadAgainstFloor(runs).then((figures) => console.log(JSON.stringify(figures)))
      : process.argv[2] === '--upload'
        ? Promise.resolve(uploadInChild(runs)).then(() => console.log(`  (load average ${os.loadavg()[0]!.toFixed(1)} on ${os.availableParallelism()} cores)`))
        : benchSpeed(runs)
  work.catch((e) => { console.error(e); process.exit(1) })
}
