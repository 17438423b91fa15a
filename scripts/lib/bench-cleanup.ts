// `npm run bench`, the automatic clean-up: its cost on a 12 MP photo as a ratio to the floor,
// sharp decoding the same photo and resizing it to the prepared size, measured in the same run.
//
// The photo: a sheet of grid paper with a drawing, photographed at an angle on a table with
// light falling off, so every automatic step has work to do (sheet corners and straightening,
// lighting evening, grid lines and colour dropout, threshold, trimming). It is made here from
// an SVG sheet warped by a known homography.
import { performance } from 'node:perf_hooks'
import sharp from 'sharp'
import { homographyFromPoints, invert, warpBilinear } from '../../server/pipeline/homography'
import { prepareDrawing, type PreparedBitmap } from '../../server/pipeline/prepare'
import { PREVIEW_SOURCE_SIDE, runPipeline } from '../../server/pipeline/run'

const median = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2 }
const ms = (x: number) => `${x.toFixed(0).padStart(5)} ms`

/** A 4000 × 3000 photo of a grid-paper sheet with a drawing, at an angle on a table. */
async function sheetPhoto(): Promise<Buffer> {
  const sw = 2100, sh = 2970 // A4 at 10 px/mm
  let grid = ''
  for (let x = 25; x < sw; x += 50) grid += `M${x} 0V${sh}`
  for (let y = 25; y < sh; y += 50) grid += `M0 ${y}H${sw}`
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${sw}" height="${sh}">
    <rect width="100%" height="100%" fill="#f6f4ee"/><path d="${grid}" stroke="#8db6e3" stroke-width="2.5" fill="none"/>
    <g fill="#222" transform="translate(300 900)">
      <circle cx="400" cy="400" r="380"/><circle cx="400" cy="400" r="160" fill="#f6f4ee"/>
      <rect x="900" y="40" width="120" height="760"/><rect x="1100" y="40" width="420" height="110"/>
      <path d="M1100 800 L1500 250 L1500 800 Z"/></g></svg>`
  const { data: sheet } = await sharp(Buffer.from(svg)).removeAlpha().raw().toBuffer({ resolveWithObject: true })
  const W = 4000, H = 3000
  const corners = [{ x: 1150, y: 260 }, { x: 2950, y: 420 }, { x: 3250, y: 2780 }, { x: 820, y: 2650 }]
  const toSheet = invert(homographyFromPoints(corners, [{ x: 0, y: 0 }, { x: sw, y: 0 }, { x: sw, y: sh }, { x: 0, y: sh }]))
  const photo = warpBilinear(new Uint8Array(sheet), sw, sh, 3, invert(toSheet), W, H, [118, 86, 58])
  // light falling off to one side, and noise
  let seed = 5
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) {
    const k = 1 - 0.35 * (x / W) * (y / H)
    for (let c = 0; c < 3; c++) {
      seed = (seed * 1103515245 + 12345) & 0x7fffffff
      const i = (y * W + x) * 3 + c
      photo[i] = Math.max(0, Math.min(255, Math.round(photo[i]! * k + ((seed >> 8) % 9) - 4)))
    }
  }
  return sharp(photo, { raw: { width: W, height: H, channels: 3 } }).jpeg({ quality: 88 }).toBuffer()
}

export async function benchCleanup(runs: number): Promise<void> {
  const widthMm = 150
  const photo = await sheetPhoto()
  // Warm up the JIT and libvips on one run of each.
  const first = await prepareDrawing(photo, {}, widthMm)
  const floor: number[] = [], auto: number[] = [], pinned: number[] = [], whole: number[] = [], upload: number[] = []
  const results: PreparedBitmap[] = []
  for (let i = 0; i < runs; i++) {
    let t0 = performance.now()
    await sharp(photo).autoOrient().resize({ width: first.width }).raw().toBuffer()
    floor.push(performance.now() - t0)
    t0 = performance.now()
    results.push(await prepareDrawing(photo, {}, widthMm))
    auto.push(performance.now() - t0)
    // The same photo with every choice pinned to what the analysis chose: no analysis of
    // lighting, lines or colour needed, but the same work on the prepared grid.
    t0 = performance.now()
    await prepareDrawing(photo, Object.fromEntries(first.choices.filter((c) => c.setting !== 'marginMm').map((c) => [c.setting, c.value])), widthMm)
    pinned.push(performance.now() - t0)
    t0 = performance.now()
    await runPipeline({ source: photo, settings: {}, widthMm, purpose: 'revision' })
    whole.push(performance.now() - t0)
    // The upload as the server does it: what the file is (sharp's header read), then the
    // whole pipeline at upload defaults, every choice automatic (storing adds a few writes).
    t0 = performance.now()
    await sharp(photo, { limitInputPixels: false }).metadata()
    await runPipeline({ source: photo, settings: {}, widthMm, purpose: 'revision' })
    upload.push(performance.now() - t0)
  }

  // The tuning bench's preview as the server makes it (server/artworks/preview.ts): from the
  // copy of the source shrunk once to PREVIEW_SOURCE_SIDE, the sheet's reading kept between
  // previews of the same source; the threshold and the outline's settings change each time.
  const previewSource = await sharp(photo).autoOrient().resize({ width: PREVIEW_SOURCE_SIDE, height: PREVIEW_SOURCE_SIDE, fit: 'inside' }).png({ compressionLevel: 0 }).toBuffer()
  const preview = (i: number) => runPipeline({
    source: previewSource, widthMm, purpose: 'preview', sourceKey: 'bench-cleanup',
    settings: i % 2 ? { threshold: { mode: 'manual', value: 120 + (i % 7) * 5 } } : { curveTolerance: 0.2 + (i % 5) * 0.05 },
  })
  await preview(0) // the first reads the sheet; the rest start from it
  const previews: number[] = []
  for (let i = 1; i <= Math.max(10, runs * 3); i++) {
    const t0 = performance.now()
    await preview(i)
    previews.push(performance.now() - t0)
  }
  const f = median(floor)
  const steps = Object.keys(results[0]!.timings.analysisSteps) as (keyof PreparedBitmap['timings']['analysisSteps'])[]
  const stage = (k: 'decodeMs' | 'analysisMs' | 'gridMs' | 'eveningMs' | 'thresholdMs' | 'pngMs') => median(results.map((r) => r.timings[k]))
  console.log(`\nAutomatic clean-up on a 12 MP photo of grid paper at an angle (${widthMm} mm, prepared ${first.width} × ${first.height} px), medians of ${runs}:`)
  console.log(`  floor: sharp decodes the JPEG and resizes it to the prepared width   ${ms(f)}`)
  console.log(`  prepared bitmap, every choice automatic                                ${ms(median(auto))}  (${(median(auto) / f).toFixed(2)}× the floor)`)
  console.log(`    decode ${stage('decodeMs').toFixed(0)}, analysis ${stage('analysisMs').toFixed(0)} (${steps.map((k) => `${k} ${median(results.map((r) => r.timings.analysisSteps[k])).toFixed(0)}`).join(', ')}), straighten and grey ${stage('gridMs').toFixed(0)}, evening ${stage('eveningMs').toFixed(0)}, threshold, lines and trim ${stage('thresholdMs').toFixed(0)}, PNG ${stage('pngMs').toFixed(0)} ms`)
  console.log(`  the analysis alone                                                     ${ms(stage('analysisMs'))}  (${(stage('analysisMs') / f).toFixed(2)}× the floor)`)
  console.log(`  prepared bitmap, the same choices pinned                               ${ms(median(pinned))}  (${(median(pinned) / f).toFixed(2)}× the floor)`)
  console.log(`  the whole revision (outline, clean vector, measurements), in this thread ${ms(median(whole))}  (${(median(whole) / f).toFixed(2)}× the floor)`)
  console.log(`  12 MP photo upload with every automatic step (read, clean up, outline, measure) ${ms(median(upload))}  (${(median(upload) / f).toFixed(2)}× the floor; target ≤ 1.5 s)`)
  console.log(`  tuning bench preview of it, the source loaded, median of ${previews.length}  ${ms(median(previews))}  (${(median(previews) / f).toFixed(2)}× the floor; target ≤ 150 ms)`)
  console.log(`  choices: ${first.choices.map((c) => `${c.setting} ${JSON.stringify(c.value)}`).join('; ')}`)
}
