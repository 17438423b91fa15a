// The hard-case set at upload defaults (no setting touched), each against its clean drawing.
//
// "Ink pixels wrong": the clean drawing is rendered onto the prepared bitmap's own grid (its
// ink box mapped onto the bitmap, a pixel being ink when at least half covered), then
//   wrong = |prepared XOR clean| / |ink of the clean drawing|.
// Trimming places the bitmap's edges on whole pixels, so the drawing may sit up to a pixel
// off; the mapping is therefore registered first: shifted by up to ±1 px and scaled by up to
// ±0.3 % on each axis (steps of ¼ px and 0.1 %), keeping the smallest count. The decal's size
// is checked on its own: the width is the one asked for, the height within 0.5 % of the
// drawing's.
import { describe, expect, it } from 'vitest'
import { NotADrawingError } from '../../../server/pipeline/errors'
import { prepareDrawing, type PreparedBitmap } from '../../../server/pipeline/prepare'
import { runPipeline } from '../../../server/pipeline/run'
import type { CleanUpChoice } from '../../../shared/types/pipeline'
import {
  cleanMask, gridBlue, gridGrey, inkBoxMm, inkOnEdges, marker, pencil, ruled, scene, skewedWithShadow, unevenLight,
  type HardCase,
} from './hard-cases'

async function inkPixelsWrong(c: HardCase, p: PreparedBitmap): Promise<{ wrong: number, box: { x: number, y: number, w: number, h: number } }> {
  const box = await inkBoxMm(c.sheet)
  const pxPerMm = p.width / box.w
  let ink = 0
  const count = async (dx: number, dy: number, sx: number, sy: number) => {
    const ref = await cleanMask(c.sheet, { x: box.x + dx / pxPerMm, y: box.y + dy / pxPerMm, w: box.w * sx, h: box.h * sy }, p.width, p.height)
    let xor = 0, n = 0
    for (let i = 0; i < ref.length; i++) { if (ref[i] !== p.bitmap[i]) xor++; if (ref[i]) n++ }
    if (!ink) ink = n
    return xor / n
  }
  let cur = [0, 0, 1, 1]
  let best = await count(0, 0, 1, 1)
  const step = [0.25, 0.25, 0.001, 0.001], reach = [1, 1, 0.003, 0.003], centre = [0, 0, 1, 1]
  for (let round = 0; round < 2; round++) {
    for (let k = 0; k < 4; k++) {
      for (const dir of [-1, 1]) {
        for (;;) {
          const t = [...cur]
          t[k]! += dir * step[k]!
          if (Math.abs(t[k]! - centre[k]!) > reach[k]! + 1e-9) break
          const e = await count(t[0]!, t[1]!, t[2]!, t[3]!)
          if (e >= best) break
          best = e; cur = t
        }
      }
    }
  }
  return { wrong: best, box }
}

function choice<S extends CleanUpChoice['setting']>(p: PreparedBitmap, setting: S): Extract<CleanUpChoice, { setting: S }> {
  const c = p.choices.find((x) => x.setting === setting)
  if (!c) throw new Error(`no choice for ${setting}`)
  return c as Extract<CleanUpChoice, { setting: S }>
}

async function atDefaults(make: () => Promise<HardCase>) {
  const c = await make()
  const p = await prepareDrawing(c.source, {}, c.widthMm)
  const { wrong, box } = await inkPixelsWrong(c, p)
  console.info(`${c.name}: ${(100 * wrong).toFixed(2)} % of ink pixels wrong; ${p.widthMm.toFixed(2)} × ${p.heightMm.toFixed(2)} mm; ${p.choices.map((x) => `${x.setting} ${JSON.stringify(x.value)}`).join('; ')}`)
  // The decal is the drawing: its width as asked, its height the drawing's (scaled alike).
  expect(Math.abs(p.widthMm - c.widthMm)).toBeLessThan(0.01)
  const trueHeight = box.h * (c.widthMm / box.w)
  expect(Math.abs(p.heightMm / trueHeight - 1)).toBeLessThanOrEqual(0.005)
  expect(wrong).toBeLessThanOrEqual(0.03)
  for (const x of p.choices) expect(x.reason).toMatch(/^[A-Z].*\.$/)
  return p
}

describe('hard cases at upload defaults: at most 3 % of ink pixels wrong', () => {
  it('uneven light: lighting evening turns itself on, and says where the paper is darker', async () => {
    const p = await atDefaults(unevenLight)
    expect(choice(p, 'lightingEvening')).toMatchObject({ automatic: true, value: { mode: 'on' } })
    expect(choice(p, 'lightingEvening').reason).toMatch(/darker at the bottom right/)
    expect(choice(p, 'threshold').value).toEqual({ mode: 'otsu' })
  })

  it('pencil on blue grid paper: the blue is read as paper', async () => {
    const p = await atDefaults(gridBlue)
    const d = choice(p, 'dropoutColour')
    expect(d.automatic).toBe(true)
    expect(d.value.mode).toBe('colours')
    expect(d.reason).toMatch(/blue/)
    expect(choice(p, 'paperLines').reason).toMatch(/grid lines \(30 across, 42 down\)/)
  })

  it('pen on grey grid paper: thin, evenly spaced lines are taken out (no colour to drop)', async () => {
    const p = await atDefaults(gridGrey)
    expect(choice(p, 'paperLines')).toMatchObject({ automatic: true, value: 'remove' })
    expect(choice(p, 'dropoutColour').value).toEqual({ mode: 'none' })
  })

  it('pen on ruled paper with a red margin line', async () => {
    const p = await atDefaults(ruled)
    expect(choice(p, 'paperLines').reason).toMatch(/ruled lines \(23\)/)
    expect(choice(p, 'dropoutColour').reason).toMatch(/red/)
  })

  it('faint, thin pencil: the adaptive threshold, its window in mm', async () => {
    const p = await atDefaults(pencil)
    const t = choice(p, 'threshold')
    expect(t.automatic).toBe(true)
    expect(t.value).toMatchObject({ mode: 'adaptive', windowMm: 8 })
    expect(t.reason).toMatch(/faint/)
  })

  it('a photo at an angle with a hand\'s shadow: straightened from the sheet\'s corners', async () => {
    const p = await atDefaults(skewedWithShadow)
    const c = choice(p, 'corners')
    expect(c.automatic).toBe(true)
    expect(c.value.mode).toBe('manual')
    expect(c.reason).toMatch(/at an angle/)
    expect(choice(p, 'lightingEvening').value.mode).toBe('on')
  })

  it('coloured marker, yellow among them: ink read by its difference from the paper', async () => {
    const p = await atDefaults(marker)
    expect(choice(p, 'inkColour')).toMatchObject({ automatic: true, value: 'colour' })
    expect(choice(p, 'inkColour').reason).toMatch(/yellow/)
  })

  it('ink touching every edge: the drawn frame is not taken for a sheet, and nothing is trimmed off', async () => {
    const p = await atDefaults(inkOnEdges)
    expect(choice(p, 'corners').value).toEqual({ mode: 'off' })
    expect(choice(p, 'lightingEvening').value.mode).toBe('off')
    // ink on all four edges of the bitmap
    const { bitmap, width, height } = p
    const row = (y: number) => bitmap.subarray(y * width, (y + 1) * width).some((v) => v === 1)
    const col = (x: number) => { for (let y = 0; y < height; y++) if (bitmap[y * width + x]) return true; return false }
    expect([row(0), row(height - 1), col(0), col(width - 1)]).toEqual([true, true, true, true])
  })

  it('a photograph of a scene is refused, plainly', async () => {
    const c = await scene()
    const err = await runPipeline({ source: new Uint8Array(c.source), settings: {}, widthMm: c.widthMm, purpose: 'revision' }).catch((e: unknown) => e)
    expect(err).toBeInstanceOf(NotADrawingError)
    expect((err as NotADrawingError).reason).toBe('scene')
    expect((err as Error).message).toMatch(/photograph of a scene.*plain paper/)
  })
})
