// `npm run bench`, the outline and its measurements: each figure beside a floor measured in the
// same run on the same input, and their ratio (so a busy machine slows both).
//  - trace stage (traceBitmap) ÷ Debian's potrace on the same bitmap, a text page and a drawing
//    of 2,000 dots (target ≤ 2×);
//  - a drawing over the node limit: how long, and how much memory, until it is refused, beside
//    Debian's potrace tracing all of it (in a child process of its own, so its peak memory is
//    its own);
//  - the measurements of a revision (measureOutline: geometry, fidelity, narrowest stroke) ÷ one
//    plain pass over the prepared bitmap's pixels, at 12 MP and on a silhouette and a pencil
//    drawing at 400 mm (target ≤ 100 ms at 12 MP).
import { spawnSync } from 'node:child_process'
import { existsSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { fileURLToPath, pathToFileURL } from 'node:url'
import sharp from 'sharp'
import { cleanVector } from '../../server/pipeline/clean'
import { TooComplexError } from '../../server/pipeline/errors'
import { measureOutline } from '../../server/pipeline/measure'
import { prepareBitmap } from '../../server/pipeline/prepare'
import { traceBitmap, traceParameters, type TraceInput } from '../../server/pipeline/trace'
import { besideShell } from './beside'

const POTRACE = '/usr/bin/potrace'
const SETTINGS = { speckFilterMm2: 0.5, cornerRounding: 1, curveTolerance: 0.2 } // the upload defaults

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2
}
const ms = (x: number) => `${x.toFixed(0).padStart(6)} ms`
const ratio = (a: number, b: number) => `${(a / b).toFixed(2)}×`

/** The time f takes, or the time it reports (a number it returns: its own part, without set-up). */
function once(f: () => unknown): number {
  const t0 = performance.now()
  const own = f()
  return typeof own === 'number' ? own : performance.now() - t0
}

function timed(runs: number, f: () => void): number {
  const t: number[] = []
  for (let i = 0; i < runs; i++) t.push(once(f))
  return median(t)
}

/**
 * Ours and the floor, run in turn (so both meet the same load), `runs` times: the medians of
 * each and of their ratios.
 */
export function sideBySide(runs: number, ours: () => unknown, floor: () => void): { ours: number; floor: number; ratio: number } {
  const a: number[] = [], b: number[] = [], r: number[] = []
  for (let i = 0; i < runs; i++) {
    const x = once(ours), y = once(floor)
    a.push(x); b.push(y); r.push(x / y)
  }
  return { ours: median(a), floor: median(b), ratio: median(r) }
}

/** An SVG drawn black on white, thresholded at half grey into a 1-bit bitmap (1 = ink). */
async function drawn(svg: string, pxPerMm: number): Promise<TraceInput> {
  const { data, info } = await sharp(Buffer.from(svg)).flatten({ background: '#fff' }).greyscale().raw().toBuffer({ resolveWithObject: true })
  const bitmap = new Uint8Array(info.width * info.height)
  for (let i = 0; i < bitmap.length; i++) bitmap[i] = data[i * info.channels]! < 128 ? 1 : 0
  return { bitmap, width: info.width, height: info.height, pxPerMm }
}

const doc = (w: number, h: number, body: string) =>
  `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}"><rect width="100%" height="100%" fill="#fff"/>${body}</svg>`

/** Small seeded generator, uniform in [0, 1). */
function lcg(seed: number): () => number {
  let s = seed
  return () => ((s = (s * 1103515245 + 12345) & 0x7fffffff) / 0x80000000)
}

/** An A4 page of 3.5 mm text at 10 px/mm. */
export function textPage(): Promise<TraceInput> {
  let lines = ''
  for (let i = 0; i < 52; i++) {
    lines += `<text x="150" y="${200 + i * 52}" font-family="DejaVu Serif" font-size="38">Line ${i + 1}: a hand-lettered decal for the robot's left side panel, team number and name.</text>`
  }
  return drawn(doc(2100, 2970, lines), 10)
}

/** 2,000 dots of 0.8–2.4 mm on a 200 mm square at 10 px/mm. */
export function dots(): Promise<TraceInput> {
  const rnd = lcg(11)
  let body = ''
  for (let i = 0; i < 2000; i++) body += `<circle cx="${(40 + rnd() * 1920).toFixed(1)}" cy="${(40 + rnd() * 1920).toFixed(1)}" r="${(4 + rnd() * 8).toFixed(1)}"/>`
  return drawn(doc(2000, 2000, body), 10)
}

/** A 400 mm silhouette (a four-legged animal) at 10 px/mm. */
function silhouette(): Promise<TraceInput> {
  return drawn(`<svg xmlns="http://www.w3.org/2000/svg" width="4000" height="3000" viewBox="0 0 1800 1350"><rect width="100%" height="100%" fill="#fff"/>
    <ellipse cx="900" cy="500" rx="600" ry="280"/><circle cx="1450" cy="300" r="180"/>
    <path d="M450 650 L560 650 L520 1150 L480 1150 Z"/><path d="M700 700 L800 700 L760 1200 L720 1200 Z" transform="rotate(15 750 950)"/>
    <path d="M1100 700 L1200 700 L1160 1200 L1120 1200 Z" transform="rotate(-20 1150 950)"/><path d="M1300 650 L1400 650 L1380 1150 L1330 1150 Z"/>
    <path d="M300 450 Q100 300 150 100" stroke="#000" stroke-width="40" fill="none"/></svg>`, 10)
}

/** A 400 mm pencil drawing: 300 thin wandering strokes at 10 px/mm. */
function pencil(): Promise<TraceInput> {
  const rnd = lcg(5)
  let body = ''
  for (let i = 0; i < 300; i++) {
    let x = rnd() * 4000, y = rnd() * 3000, d = `M${x.toFixed(0)} ${y.toFixed(0)}`
    for (let k = 0; k < 6; k++) { x += (rnd() - 0.5) * 600; y += (rnd() - 0.5) * 600; d += ` Q${(x + 100).toFixed(0)} ${(y - 80).toFixed(0)} ${x.toFixed(0)} ${y.toFixed(0)}` }
    body += `<path d="${d}" stroke="#000" stroke-width="${(4 + rnd() * 8).toFixed(1)}" fill="none"/>`
  }
  return drawn(doc(4000, 3000, body), 10)
}

function toPbm(b: TraceInput): Buffer {
  const rowBytes = Math.ceil(b.width / 8)
  const bits = Buffer.alloc(rowBytes * b.height)
  for (let y = 0; y < b.height; y++) {
    for (let x = 0; x < b.width; x++) if (b.bitmap[y * b.width + x]) bits[y * rowBytes + (x >> 3)]! |= 0x80 >> (x & 7)
  }
  return Buffer.concat([Buffer.from(`P4\n${b.width} ${b.height}\n`), bits])
}

/**
 * Debian's potrace on the bitmap with our parameters, including process start and SVG output:
 * a function that runs it once (from the shell beside the bench: beside.ts), and one that
 * removes its files.
 */
export function potraceRunner(b: TraceInput): { run: () => void; done: () => void } {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'dw-bench-geometry-'))
  const pbm = path.join(dir, 'in.pbm')
  writeFileSync(pbm, toPbm(b))
  const p = traceParameters(SETTINGS, b.pxPerMm)
  const beside = besideShell()
  return {
    run: () => beside.run(POTRACE, ['-s', '-t', String(p.turdSize), '-a', String(p.alphaMax), '-O', String(p.optTolerance), '-o', path.join(dir, 'out.svg'), pbm]),
    done: () => { beside.close(); rmSync(dir, { recursive: true, force: true }) },
  }
}

/** A plain pass over the bitmap's pixels: the floor of anything that reads them all. */
function pass(b: { bitmap: Uint8Array }): () => void {
  let sink = 0
  return () => {
    let s = 0
    const px = b.bitmap
    for (let i = 0; i < px.length; i++) s += px[i]!
    sink += s
    if (sink < 0) throw new Error('unreachable')
  }
}

/** A 400 mm sheet of bad-threshold paper texture: a few thousand ragged blobs, far over the node limit. */
async function texture(): Promise<TraceInput> {
  const rnd = lcg(3)
  const small = Buffer.alloc(400 * 400)
  for (let i = 0; i < small.length; i++) small[i] = Math.floor(rnd() * 256)
  const { data } = await sharp(small, { raw: { width: 400, height: 400, channels: 1 } })
    .resize(4000, 4000, { kernel: 'cubic' }).blur(3).raw().toBuffer({ resolveWithObject: true })
  const bitmap = new Uint8Array(4000 * 4000)
  for (let i = 0; i < bitmap.length; i++) bitmap[i] = data[i]! < 128 ? 1 : 0
  return { bitmap, width: 4000, height: 4000, pxPerMm: 10 }
}

/** Child process: trace the texture until it is refused; report time, nodes and peak memory. */
async function refusalChild(): Promise<void> {
  const b = await texture()
  const before = process.resourceUsage().maxRSS
  const t0 = performance.now()
  let outcome = 'traced'
  try {
    traceBitmap(b, SETTINGS)
  } catch (e) {
    if (!(e instanceof TooComplexError)) throw e
    outcome = 'refused'
  }
  const refuseMs = performance.now() - t0
  const peakMb = process.resourceUsage().maxRSS / 1024
  let theirs: number | null = null
  if (existsSync(POTRACE)) {
    const potrace = potraceRunner(b)
    theirs = once(potrace.run)
    potrace.done()
  }
  process.stdout.write(JSON.stringify({ outcome, refuseMs, peakMb, beforeMb: before / 1024, potraceMs: theirs }))
}

export async function benchGeometry(photo12: Buffer, runs: number): Promise<void> {
  console.log('\nOutline and measurements (scripts/lib/bench-geometry.ts)')
  const havePotrace = existsSync(POTRACE)

  console.log('  Trace stage ÷ Debian potrace on the same bitmap (incl. its process start and SVG output; target ≤ 2×):')
  for (const [name, make] of [['text page, A4 at 10 px/mm', textPage], ['2,000 dots, 200 mm at 10 px/mm', dots]] as const) {
    const b = await make()
    const nodes = traceBitmap(b, SETTINGS).nodeCount // also the warm-up
    if (!havePotrace) { console.log(`    ${name}: ours ${ms(timed(runs, () => traceBitmap(b, SETTINGS)))} (${nodes} nodes); Debian potrace not installed (apt-get install potrace)`); continue }
    const potrace = potraceRunner(b)
    const t = sideBySide(runs, () => traceBitmap(b, SETTINGS), potrace.run)
    potrace.done()
    console.log(`    ${name.padEnd(32)} ours ${ms(t.ours)}   potrace ${ms(t.floor)}   ${t.ratio.toFixed(2)}×   (${b.width}×${b.height} px, ${nodes} nodes)`)
  }

  const child = spawnSync(process.execPath, ['--import', 'tsx', fileURLToPath(import.meta.url), '--refusal'], { encoding: 'utf8', maxBuffer: 1 << 20 })
  if (child.status !== 0) console.log(`  Refusal over the node limit: the child process failed: ${child.stderr.trim().split('\n').pop()}`)
  else {
    const r = JSON.parse(child.stdout) as { outcome: string; refuseMs: number; peakMb: number; beforeMb: number; potraceMs: number | null }
    console.log(`  Paper texture over the node limit, 400 × 400 mm at 10 px/mm: ${r.outcome} after ${ms(r.refuseMs)}`
      + (r.potraceMs === null ? '' : `, ${ratio(r.refuseMs, r.potraceMs)} Debian potrace's whole trace of it (${ms(r.potraceMs)})`))
    console.log(`    peak memory of that process ${r.peakMb.toFixed(0)} MB, of which ${r.beforeMb.toFixed(0)} MB before tracing (Node, the bitmap)`)
  }

  console.log('  Measurements of a revision (geometry, fidelity, narrowest stroke) ÷ one pass over the pixels (target ≤ 100 ms at 12 MP):')
  const photo = await prepareBitmap(photo12, { lightingEvening: { enabled: true, strength: 1 } }, 150)
  const inputs: Array<[string, TraceInput]> = [
    ['12 MP photo at 150 mm', photo],
    ['silhouette at 400 mm', await silhouette()],
    ['pencil drawing at 400 mm', await pencil()],
  ]
  for (const [name, b] of inputs) {
    const clean = cleanVector(traceBitmap(b, SETTINGS))
    const figures = measureOutline(clean, b, 1) // warm-up
    const parts = { geometryMs: [] as number[], fidelityMs: [] as number[], narrowestMs: [] as number[] }
    const t = sideBySide(runs, () => {
      const m = measureOutline(clean, b, 1)
      for (const k of Object.keys(parts) as Array<keyof typeof parts>) parts[k].push(m.timings[k])
    }, pass(b))
    console.log(`    ${name.padEnd(26)} ${ms(t.ours)}   pass ${t.floor.toFixed(1).padStart(5)} ms   ${t.ratio.toFixed(0).padStart(3)} passes`
      + `   (geometry ${median(parts.geometryMs).toFixed(0)}, fidelity ${median(parts.fidelityMs).toFixed(0)}, narrowest ${median(parts.narrowestMs).toFixed(0)} ms;`
      + ` ${b.width}×${b.height} px, narrowest ${figures.narrowestFeatureMm?.toFixed(2)} mm)`)
  }
}

if (process.argv[2] === '--refusal' && import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  refusalChild().catch((e) => { console.error(e); process.exit(1) })
}
