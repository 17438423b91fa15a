// `npm run bench`, colour layers: a three-colour phone photo of 12 MP (a red disc, a blue block
// touching it, a yellow star, on cream paper under uneven light, with noise and JPEG), at
// 150 mm. Separation alone on the full 12 MP, the layered revision from the JPEG (decode,
// separate, outline, clean, stack, marks, measure: everything but the object-store writes),
// and the tuning bench's preview from the shrunk source it keeps. Wall time and this process's
// CPU time (libvips threads included), beside a floor measured in the same run: decoding the
// 12 MP JPEG once, so a busy machine shows as a slower floor too.
import os from 'node:os'
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { performance } from 'node:perf_hooks'
import { build } from 'esbuild'
import Piscina from 'piscina'
import sharp from 'sharp'
import type { LayeredTimings } from '../../server/pipeline/colour/run-layers'
import { runColourLayers, runColourLayersWith, type ColourAnswer, type ColourTask } from '../../server/pipeline/colour/tasks'
import { separateColours } from '../../server/pipeline/colour/separate'
import { layeredUpload, layersAsAsked } from '../../server/pipeline/colour/upload'
import type { WorkerAnswer } from '../../server/pipeline/worker'
import { colourSettingsSchema } from '../../shared/utils/colour-settings'
import { PREVIEW_SOURCE_SIDE } from '../../shared/utils/settings'

const WIDTH_MM = 150
const REVISION_TARGET_MS = 2500
const PREVIEW_TARGET_MS = 400

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2
}

/** Median wall and CPU time of `runs` calls. */
async function timed<T>(runs: number, f: () => Promise<T>): Promise<{ wall: number; cpu: number; last: T }> {
  const wall: number[] = [], cpu: number[] = []
  let last!: T
  for (let i = 0; i < runs; i++) {
    const c0 = process.cpuUsage()
    const t0 = performance.now()
    last = await f()
    wall.push(performance.now() - t0)
    const c = process.cpuUsage(c0)
    cpu.push((c.user + c.system) / 1000)
  }
  return { wall: median(wall), cpu: median(cpu), last }
}

/** A three-colour drawing photographed: 4:3, `megapixels` MP, as JPEG. */
export async function threeColourPhoto(megapixels: number): Promise<Buffer> {
  const w = Math.round(Math.sqrt((megapixels * 1e6 * 4) / 3))
  const h = Math.round((w * 3) / 4)
  const star: string[] = []
  for (let i = 0; i < 10; i++) {
    const r = (i % 2 ? 0.052 : 0.125) * w
    const t = -Math.PI / 2 + (i * Math.PI) / 5
    star.push(`${(0.8 * w + r * Math.cos(t)).toFixed(1)},${(0.33 * h + r * Math.sin(t)).toFixed(1)}`)
  }
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}">
    <defs><radialGradient id="v" cx="35%" cy="35%" r="85%"><stop offset="0" stop-color="#f4eedf"/><stop offset="1" stop-color="#8e887a"/></radialGradient>
    <linearGradient id="s" x1="0" y1="0" x2="1" y2="0"><stop offset="0" stop-color="#000" stop-opacity="0"/><stop offset="1" stop-color="#000" stop-opacity="0.25"/></linearGradient></defs>
    <rect width="100%" height="100%" fill="url(#v)"/>
    <circle cx="${0.32 * w}" cy="${0.52 * h}" r="${0.24 * h}" fill="#c8262e"/>
    <rect x="${0.47 * w}" y="${0.37 * h}" width="${0.19 * w}" height="${0.46 * h}" fill="#1d4fb0"/>
    <polygon points="${star.join(' ')}" fill="#e8c81a"/>
    <rect width="100%" height="100%" fill="url(#s)"/>
  </svg>`
  const base = await sharp(Buffer.from(svg)).removeAlpha().raw().toBuffer({ resolveWithObject: true })
  const d = base.data
  let s = 11
  for (let i = 0; i < d.length; i++) {
    s = (s * 1103515245 + 12345) & 0x7fffffff
    d[i] = Math.max(0, Math.min(255, d[i]! + ((s >> 8) % 13) - 6))
  }
  return sharp(d, { raw: base.info }).jpeg({ quality: 88 }).toBuffer()
}

/** The pipeline worker bundled for piscina, as the server has it: one-colour runs and the colour layers' tasks (sharp, potrace and svgo external). */
async function buildColourWorker(): Promise<string> {
  const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..')
  const file = path.join(root, 'node_modules/.cache/decalwright-bench/colour-worker.mjs')
  await build({
    entryPoints: [path.join(root, 'server/pipeline/worker.ts')],
    outfile: file, bundle: true, platform: 'node', format: 'esm', target: 'node20', logLevel: 'warning',
    external: ['sharp', 'potrace', 'svgo'],
  })
  return file
}

const ms = (x: number) => `${x.toFixed(0).padStart(6)} ms`

export async function benchColour(runs: number): Promise<void> {
  const photo = await threeColourPhoto(12)
  const floor = await timed(runs, () => sharp(photo).raw().toBuffer({ resolveWithObject: true }))
  const line = (what: string, t: { wall: number; cpu: number }, target?: number) =>
    console.log(`  ${what.padEnd(52)} ${ms(t.wall)} (CPU ${ms(t.cpu).trim()})  ${(t.wall / floor.wall).toFixed(1).padStart(5)}× floor${target ? `  (target ≤ ${target} ms)` : ''}`)
  console.log(`\nColour layers, a three-colour 12 MP phone photo at ${WIDTH_MM} mm (floor: decoding the JPEG, ${floor.wall.toFixed(0)} ms):`)

  const raw = floor.last
  const image = { data: new Uint8Array(raw.data.buffer, raw.data.byteOffset, raw.data.length), width: raw.info.width, height: raw.info.height, channels: raw.info.channels as 3 }
  const sep = await timed(runs, () => separateColours(image))
  line(`separation alone, every one of the 12 MP classified`, sep)
  console.log(`    analyse ${sep.last.timings.analyseMs.toFixed(0)} ms, classify ${sep.last.timings.classifyMs.toFixed(0)} ms; "${sep.last.sentence}"`)

  const revision = await timed(runs, () => runColourLayers({ source: photo, settings: {}, widthMm: WIDTH_MM, purpose: 'revision' }))
  line('JPEG → layered revision files (no storage)', revision, REVISION_TARGET_MS)
  const stages = (t: LayeredTimings) => `decode ${t.decodeMs.toFixed(0)}, separate ${t.separateMs.toFixed(0)}, outline ${t.traceMs.toFixed(0)}, clean ${t.cleanMs.toFixed(0)}, stack + marks ${t.stackMs.toFixed(0)}, measure and PNG ${t.measureMs.toFixed(0)} ms`
  const r = revision.last
  if (r.kind === 'layers') console.log(`    ${stages(r.timings)}; ${r.layers.length} layers at ${r.pxPerMm.toFixed(1)} px/mm`)

  // The tuning bench starts from the shrunk copy the server keeps (long side PREVIEW_SOURCE_SIDE).
  const previewSource = await sharp(photo).resize({ width: PREVIEW_SOURCE_SIDE, height: PREVIEW_SOURCE_SIDE, fit: 'inside' }).png({ compressionLevel: 0 }).toBuffer()
  const preview = await timed(runs * 2, () => runColourLayers({ source: previewSource, settings: {}, widthMm: WIDTH_MM, purpose: 'preview' }))
  line('preview of the layered drawing, source loaded', preview, PREVIEW_TARGET_MS)
  if (preview.last.kind === 'layers') console.log(`    ${stages(preview.last.timings)}`)

  // Through a pool of worker threads as the server would run it: the inks outlined side by side.
  const threads = os.availableParallelism()
  const pool = new Piscina({ filename: await buildColourWorker(), maxThreads: threads, minThreads: threads })
  const run = (task: ColourTask) => pool.run(task) as Promise<ColourAnswer>
  await runColourLayersWith(run, { source: previewSource, settings: {}, widthMm: WIDTH_MM, purpose: 'preview' }) // warm the threads
  console.log(`  through a pool of ${threads} worker threads (CPU: the whole process, its threads included):`)
  line('  JPEG → layered revision files (no storage)', await timed(runs, () => runColourLayersWith(run, { source: photo, settings: {}, widthMm: WIDTH_MM, purpose: 'revision' })), REVISION_TARGET_MS)
  line('  preview of the layered drawing, source loaded', await timed(runs * 2, () => runColourLayersWith(run, { source: previewSource, settings: {}, widthMm: WIDTH_MM, purpose: 'preview' })), PREVIEW_TARGET_MS)

  // As the server runs them: an upload makes the one-colour revision and, beside it, the
  // layered one (a first look decides, the source is trimmed to the inks and separated again);
  // the bench's colour panel previews the designer's settings on the shrunk source.
  const upload = await timed(runs, async () => {
    const single = pool.run({ source: photo, settings: {}, widthMm: WIDTH_MM, purpose: 'revision' }) as Promise<WorkerAnswer>
    const choices = single.then((a) => (a.ok ? a.result.choices : []))
    const [layered] = await Promise.all([layeredUpload(run, { source: photo, settings: {}, widthMm: WIDTH_MM, purpose: 'revision' }, choices), single])
    return layered
  })
  line('  upload → layered revision files, one colour beside it', upload, REVISION_TARGET_MS)
  console.log(`    ${upload.last.kind === 'layers' ? `${upload.last.result.layers.length} layers: ${upload.last.colour.sentence}` : `one colour: ${upload.last.why}`}`)
  const asked = colourSettingsSchema.parse({ drop: [0] })
  line('  bench colour panel: preview with one ink dropped', await timed(runs * 2, () => layersAsAsked(run, { source: previewSource, settings: {}, widthMm: WIDTH_MM, purpose: 'preview' }, asked)), PREVIEW_TARGET_MS)
  await pool.destroy()
}
