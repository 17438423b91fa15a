// A photographed three-ink drawing from its JPEG to stacked, framed layers: the stacked
// preview rasterised back matches the drawing; a one-ink drawing is left to the ordinary
// pipeline.
import sharp from 'sharp'
import { beforeAll, describe, expect, it } from 'vitest'
import { readCleanVector, readSvgRoot } from '../../../../server/cutsheet/path'
import { deltaE00, srgbToLab } from '../../../../server/pipeline/colour/lab'
import { layerPreviewSvg, stackedPreviewSvg } from '../../../../server/pipeline/colour/preview'
import type { LayeredRunResult } from '../../../../server/pipeline/colour/run-layers'
import { runColourLayers } from '../../../../server/pipeline/colour/tasks'
import { blackDrawing, photograph, threeInkDrawing, trueMasks } from './drawing'

const WIDTH_MM = 120
type Layers = Extract<LayeredRunResult, { kind: 'layers' }>

describe('a three-ink photo to layers', () => {
  const drawing = threeInkDrawing()
  let jpeg: Buffer
  let run: Layers
  beforeAll(async () => {
    jpeg = (await photograph(drawing)).jpeg
    const r = await runColourLayers({ source: jpeg, settings: {}, widthMm: WIDTH_MM, purpose: 'revision' })
    if (r.kind !== 'layers') throw new Error('expected layers')
    run = r
  })

  it('gives three layers, bottom first, each a clean vector on the framed canvas with its measurements', () => {
    expect(run.layers.map((l) => l.name)).toEqual(['yellow', 'red', 'blue'])
    for (const l of run.layers) {
      const root = readSvgRoot(l.cleanSvg)
      expect(root.widthMm).toBeCloseTo(run.frame.widthMm, 6)
      expect(root.heightMm).toBeCloseTo(run.frame.heightMm, 6)
      expect(readSvgRoot(l.drawnSvg).widthMm).toBeCloseTo(WIDTH_MM, 6)
      expect(l.measurements.fidelity).toBeGreaterThan(0.97)
      expect(l.measurements.pieces).toBeGreaterThanOrEqual(1)
      expect(l.measurements.inkAreaMm2).toBeGreaterThan(0)
    }
    expect(run.frame.marks).toHaveLength(3)
    expect(run.separation.sentence).toMatch(/^3 inks found: /)
  })

  it('draws the stacked layers like the drawing: at most 2 % of its ink pixels a wrong colour', async () => {
    // Rasterise the stacked preview at the drawing's pixel size, the frame's shift cut away.
    const k = drawing.width / WIDTH_MM
    const { shift } = run.frame
    const W = Math.round(run.frame.widthMm * k), H = Math.round(run.frame.heightMm * k)
    const svg = run.stackedSvg.replace(/width="[^"]*mm" height="[^"]*mm"/, `width="${W}" height="${H}" preserveAspectRatio="none"`)
    const png = await sharp(Buffer.from(svg))
      .extract({ left: Math.round(shift.x * k), top: Math.round(shift.y * k), width: drawing.width, height: drawing.height })
      .ensureAlpha().raw().toBuffer({ resolveWithObject: true })
    const truth = await trueMasks(drawing)
    const labs = run.layers.map((l) => l.lab)
    const wantIndex = drawing.inks.map((ink) => {
      const n = parseInt(ink.hex.slice(1), 16)
      const lab = srgbToLab(n >> 16, (n >> 8) & 255, n & 255)
      return labs.map((x) => deltaE00(x, lab)).reduce((b, d, i, a) => (d < a[b]! ? i : b), 0)
    })
    const hexes = run.layers.map((l) => [1, 3, 5].map((o) => parseInt(l.hex.slice(o, o + 2), 16)))
    let wrong = 0, ink = 0
    const ch = png.info.channels
    for (let i = 0; i < drawing.width * drawing.height; i++) {
      const want = truth.findIndex((m) => m[i])
      const a = png.data[i * ch + 3]!
      let got = -1
      if (a >= 128) {
        const px = [png.data[i * ch]!, png.data[i * ch + 1]!, png.data[i * ch + 2]!]
        got = hexes.map((h) => Math.hypot(h[0]! - px[0]!, h[1]! - px[1]!, h[2]! - px[2]!)).reduce((b, d, j, arr) => (d < arr[b]! ? j : b), 0)
      }
      const wantLayer = want < 0 ? -1 : wantIndex[want]!
      if (got !== wantLayer) wrong++
      if (want >= 0) ink++
    }
    expect(wrong / ink).toBeLessThanOrEqual(0.02)
  })

  it('gives the same bytes twice', async () => {
    const again = await runColourLayers({ source: jpeg, settings: {}, widthMm: WIDTH_MM, purpose: 'revision' })
    if (again.kind !== 'layers') throw new Error('expected layers')
    expect(again.layers.map((l) => l.cleanSvg)).toEqual(run.layers.map((l) => l.cleanSvg))
    expect(again.stackedSvg).toBe(run.stackedSvg)
  })

  it('previews at screen resolution too', async () => {
    const preview = await runColourLayers({ source: jpeg, settings: {}, widthMm: WIDTH_MM, purpose: 'preview' })
    expect(preview.kind).toBe('layers')
    if (preview.kind === 'layers') {
      expect(preview.pxPerMm).toBeLessThanOrEqual(6)
      expect(preview.layers).toHaveLength(3)
    }
  })

  it('takes picks as fractions of the source, the same on the full photo and on a shrunk copy', async () => {
    // The red disc's centre (380, 470) and the blue block (670, 540) of the 1200 × 900 drawing.
    const picks = [{ x: 380 / 1200, y: 470 / 900, radius: 0.005 }, { x: 670 / 1200, y: 540 / 900 }]
    const small = await sharp(jpeg).resize(600).jpeg({ quality: 90 }).toBuffer()
    for (const source of [jpeg, small]) {
      const r = await runColourLayers({ source, settings: {}, widthMm: WIDTH_MM, purpose: 'preview', colour: { choices: { picks } } })
      if (r.kind !== 'layers') throw new Error('expected layers')
      expect(r.layers.map((l) => l.name).sort()).toEqual(['blue', 'red'])
    }
    await expect(runColourLayers({ source: jpeg, settings: {}, widthMm: WIDTH_MM, purpose: 'preview', colour: { choices: { picks: [{ x: 380, y: 470 }] } } })).rejects.toMatchObject({ kind: 'settings' })
  })

  it('draws one layer alone, and the stack as groups in order, in mm', () => {
    const layers = run.layers.map((l) => ({ svg: l.cleanSvg, hex: l.hex }))
    const all = stackedPreviewSvg(layers, '#ffffff')
    expect([...all.matchAll(/<g id="dw-layer-(\d)" fill="(#[0-9a-f]{6})"/g)].map((m) => [m[1], m[2]])).toEqual(run.layers.map((l, i) => [String(i + 1), l.hex]))
    expect(readSvgRoot(all).widthMm).toBeCloseTo(run.frame.widthMm, 6)
    const alone = layerPreviewSvg(layers, 1)
    expect(alone).toContain('id="dw-layer-2"')
    expect(alone).not.toContain('dw-layer-1')
    // The layer alone holds exactly the layer's own paths.
    expect(readCleanVector(alone.replace(/<\/?g[^>]*>/g, '')).curves.length).toBe(readCleanVector(run.layers[1]!.cleanSvg).curves.length)
    expect(() => stackedPreviewSvg([{ svg: run.layers[0]!.cleanSvg, hex: 'red' }])).toThrow(RangeError)
  })
})

describe('a one-ink photo', () => {
  it('is left to the single-colour pipeline', async () => {
    const { jpeg } = await photograph(blackDrawing())
    const r = await runColourLayers({ source: jpeg, settings: {}, widthMm: 100, purpose: 'revision' })
    expect(r.kind).toBe('single')
    expect(r.separation.sentence).toMatch(/^1 ink found: black/)
  })

  it('refuses a file that is not an image', async () => {
    await expect(runColourLayers({ source: new Uint8Array([1, 2, 3]), settings: {}, widthMm: 100, purpose: 'revision' })).rejects.toThrow(/could not be read/)
  })
})
