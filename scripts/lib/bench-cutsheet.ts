// `npm run bench`, cut sheets: a 200-copy sheet of a 3,500-node drawing, SVG and DXF, in this
// thread and in a worker thread (with the event loop's longest pause meanwhile), and the
// same with kerf compensation, text labels and weeding lines. Figures are printed beside a
// floor measured in the same run (copying the finished files' bytes once), so a busy machine
// shows as a slower floor too.
import path from 'node:path'
import { monitorEventLoopDelay, performance } from 'node:perf_hooks'
import Piscina from 'piscina'
import type { CutCurve, Point, Segment } from '../../server/cutsheet/path'
import { writeSheetDxfBytes } from '../../server/cutsheet/dxf'
import { buildCutSheets, planCutSheets, type BatchSheetInput } from '../../server/cutsheet/sheet'
import { writeSheetSvg } from '../../server/cutsheet/svg'
import type { CutSheetAnswer, CutSheetRequest } from '../../server/cutsheet/worker'
import { buildCutSheetWorker } from './pipeline-worker-build'

const COPIES = 200
const TARGET_MS = 300

export function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2
}
const ms = (x: number) => `${x.toFixed(0).padStart(5)} ms`

/**
 * A wobbly closed curve of `n` cubic segments about (cx, cy): radius r·(1 + a·sin(kθ)), each
 * segment a cubic through consecutive points with tangents from the neighbours (Catmull–Rom
 * to Bézier: control points p1 + (p2 − p0) / 6 and p2 − (p3 − p1) / 6).
 */
function wobble(cx: number, cy: number, r: number, n: number, k: number, a: number, reverse: boolean): CutCurve {
  const pts: Point[] = []
  for (let i = 0; i < n; i++) {
    const t = (reverse ? -1 : 1) * (2 * Math.PI * i) / n
    const rr = r * (1 + a * Math.sin(k * t))
    pts.push({ x: cx + rr * Math.cos(t), y: cy + rr * Math.sin(t) })
  }
  const at = (i: number) => pts[(i + n) % n]!
  const segments: Segment[] = pts.map((p1, i) => {
    const p0 = at(i - 1), p2 = at(i + 1), p3 = at(i + 2)
    return {
      kind: 'cubic',
      from: p1,
      c1: { x: p1.x + (p2.x - p0.x) / 6, y: p1.y + (p2.y - p0.y) / 6 },
      c2: { x: p2.x - (p3.x - p1.x) / 6, y: p2.y - (p3.y - p1.y) / 6 },
      to: p2,
    }
  })
  return { segments }
}

/** A 35 × 22 mm drawing of 3,500 nodes: a wavy outline of 1,000 segments and 50 holes of 50. */
export function detailedDrawing(): { curves: CutCurve[]; widthMm: number; heightMm: number; nodes: number } {
  const W = 35, H = 22
  const curves: CutCurve[] = []
  // The outline: an ellipse-like wobble filling the box (scaled circle).
  const outer = wobble(0, 0, 1, 1000, 23, 0.02, false)
  const sx = W / 2 / 1.03, sy = H / 2 / 1.03
  const scale = (p: Point): Point => ({ x: W / 2 + p.x * sx, y: H / 2 + p.y * sy })
  curves.push({ segments: outer.segments.map((s) => s.kind === 'cubic' ? { kind: 'cubic', from: scale(s.from), c1: scale(s.c1), c2: scale(s.c2), to: scale(s.to) } : s) })
  for (let i = 0; i < 10; i++) {
    for (let j = 0; j < 5; j++) curves.push(wobble(7 + i * 2.3, 6 + j * 2.5, 0.8, 50, 5, 0.15, true))
  }
  return { curves, widthMm: W, heightMm: H, nodes: curves.reduce((n, c) => n + c.segments.length, 0) }
}

export async function benchCutSheets(runs: number): Promise<void> {
  const drawing = detailedDrawing()
  const base: BatchSheetInput = {
    designs: [{ id: 'J1', curves: drawing.curves, widthMm: drawing.widthMm, heightMm: drawing.heightMm, count: COPIES }],
    sheetWidthMm: 600, sheetHeightMm: 400, gapMm: 3, marginMm: 5,
  }
  const cases: [string, BatchSheetInput][] = [
    ['plain (kerf 0, ids only)', base],
    ['kerf 0.2 mm, text labels', { ...base, kerfMm: 0.2, labels: { mode: 'text' } }],
    ['kerf 0.2, labels, weeding lines 10 mm / 1 mm', { ...base, kerfMm: 0.2, labels: { mode: 'text' }, weedingLines: { spacingMm: 10, clearanceMm: 1 } }],
  ]
  console.log(`\nCut sheets: ${COPIES} copies of a ${drawing.widthMm} × ${drawing.heightMm} mm drawing of ${drawing.nodes} nodes on a 600 × 400 mm sheet, SVG and DXF (target ≤ ${TARGET_MS} ms a sheet)`)
  // First, in a worker thread as the server should run it (before this thread has garbage of
  // its own to collect): the event loop's longest pause meanwhile.
  const dir = path.resolve('node_modules/.cache/decalwright-bench')
  const pool = new Piscina({ filename: await buildCutSheetWorker(dir), maxThreads: 1, minThreads: 1 })
  const request: CutSheetRequest = { kind: 'batch', input: cases[1]![1] }
  await pool.run(request) // warm the thread
  // Floor: the same measurement while this process does nothing, for as long as the runs take
  // (on a shared machine the event loop also waits for a free core).
  const idle = monitorEventLoopDelay({ resolution: 1 })
  idle.enable()
  await new Promise((resolve) => setTimeout(resolve, 600 * runs))
  idle.disable()
  const delay = monitorEventLoopDelay({ resolution: 1 })
  let longest = 0
  let last = performance.now()
  const ticker = setInterval(() => { const now = performance.now(); longest = Math.max(longest, now - last - 5); last = now }, 5)
  const walls: number[] = []
  delay.enable()
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now()
    const answer = (await pool.run(request)) as CutSheetAnswer
    if (!answer.ok) throw new Error(`the worker answered ${JSON.stringify(answer).slice(0, 300)}`)
    walls.push(performance.now() - t0)
  }
  delay.disable()
  clearInterval(ticker)
  await pool.destroy()
  console.log(`  in a worker thread (kerf, labels), request to bytes: median ${ms(median(walls))}; longest event-loop pause ${(delay.max / 1e6).toFixed(1)} ms (histogram), ${longest.toFixed(1)} ms (timer gap), idle floor ${(idle.max / 1e6).toFixed(1)} ms; the files come back as bytes here, while the server has the thread store them (its pause is measured below)`)

  const first = buildCutSheets(base)
  const sheet = first.sheets[0]!
  if (first.sheets.length !== 1 || sheet.copies !== COPIES) throw new Error(`expected ${COPIES} copies on one sheet, got ${first.sheets.map((s) => s.copies).join(' + ')}`)
  // Floor: copying the finished files once (a memory-bound step every build must at least do).
  const floor: number[] = []
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now()
    Buffer.from(sheet.svg!, 'utf8'); Buffer.from(sheet.dxf!, 'utf8')
    floor.push(performance.now() - t0)
  }
  console.log(`  files: SVG ${(sheet.svg!.length / 1024).toFixed(0)} KiB, DXF ${(sheet.dxf!.length / 1024 / 1024).toFixed(1)} MiB (${sheet.dxf!.split('VERTEX').length - 1} vertices); floor (copy both once): ${ms(median(floor))}`)
  // Wall time, and this process's CPU time (on a machine shared with other work the wall
  // time includes waiting for a core), split into planning (kerf, packing, weeding lines,
  // labels), the SVG, and the DXF written as bytes as the worker does.
  console.log(`  ${''.padEnd(46)}   wall a sheet    CPU a sheet   of which plan · SVG · DXF bytes (CPU)`)
  for (const [name, input] of cases) {
    buildCutSheets(input) // warm-up
    const wall: number[] = [], cpu: number[] = [], stages: number[][] = []
    for (let i = 0; i < runs; i++) {
      const t0 = performance.now(), c0 = process.cpuUsage()
      const out = buildCutSheets(input)
      const c = process.cpuUsage(c0)
      wall.push((performance.now() - t0) / out.sheets.length)
      cpu.push((c.user + c.system) / 1000 / out.sheets.length)
      const cpuOf = (f: () => unknown) => { const s0 = process.cpuUsage(); f(); const d = process.cpuUsage(s0); return (d.user + d.system) / 1000 }
      let planned = planCutSheets(input)
      const plan = cpuOf(() => { planned = planCutSheets(input) })
      const p = planned.sheets[0]!.plan
      stages.push([plan, cpuOf(() => writeSheetSvg(p)), cpuOf(() => writeSheetDxfBytes(p))])
    }
    const st = [0, 1, 2].map((k) => median(stages.map((x) => x[k]!)).toFixed(0)).join(' · ')
    console.log(`  ${name.padEnd(46)} ${ms(median(wall))} (${(median(wall) / Math.max(median(floor), 0.01)).toFixed(0)}× floor) ${ms(median(cpu))}   ${st} ms`)
  }
}
