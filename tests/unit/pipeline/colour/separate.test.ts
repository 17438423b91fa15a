// Colour separation on drawings made in code, whose true mask per ink is known: photographed
// (shading, tinted paper, lens blur, noise, JPEG), then separated; every layer compared with
// its mask pixel by pixel.
import { beforeAll, describe, expect, it } from 'vitest'
import { deltaE00, srgbToLab, type Lab } from '../../../../server/pipeline/colour/lab'
import { PAPER, separateColours, separationSentence, type Separation } from '../../../../server/pipeline/colour/separate'
import { blackDrawing, photograph, threeInkDrawing, trueMasks, type ColourDrawing } from './drawing'

const hexLab = (hex: string): Lab => { const n = parseInt(hex.slice(1), 16); return srgbToLab(n >> 16, (n >> 8) & 255, n & 255) }

/** Pixels where the layer and the true mask differ, over the true mask's ink pixels. */
function wrongShare(mask: Uint8Array, truth: Uint8Array): number {
  let wrong = 0, ink = 0
  for (let i = 0; i < truth.length; i++) {
    if (mask[i] !== truth[i]) wrong++
    if (truth[i]) ink++
  }
  return wrong / ink
}

/** The layer whose colour is nearest (ΔE00) to each drawn ink. */
function matchLayers(sep: Separation, d: ColourDrawing): number[] {
  return d.inks.map((ink) => {
    const want = hexLab(ink.hex)
    let best = -1, bestD = Infinity
    sep.inks.forEach((layer, k) => { const dd = deltaE00(layer.lab, want); if (dd < bestD) { bestD = dd; best = k } })
    return best
  })
}

describe('a three-ink drawing photographed by a phone', () => {
  const drawing = threeInkDrawing()
  let truth: Uint8Array[]
  let sep: Separation
  let rgb: Uint8Array
  beforeAll(async () => {
    truth = await trueMasks(drawing)
    rgb = (await photograph(drawing)).rgb
    sep = await separateColours({ data: rgb, width: drawing.width, height: drawing.height, channels: 3 })
  })

  it('finds three inks, names them, and leaves the cream paper and its shading out', () => {
    expect(sep.inks).toHaveLength(3)
    expect(new Set(sep.inks.map((i) => i.name))).toEqual(new Set(['red', 'blue', 'yellow']))
    expect(sep.paper.tint).toBe('cream')
    expect(sep.sentence).toMatch(/^3 inks found: (red|blue|yellow), (red|blue|yellow) and (red|blue|yellow); the paper's cream tint and its shading were left out\.$/)
    // Stack order: lightest at the bottom.
    expect(sep.inks.map((i) => i.name)[0]).toBe('yellow')
  })

  it('reports each ink\'s colour close to the marker\'s own colour, the paper divided out', () => {
    const m = matchLayers(sep, drawing)
    expect(new Set(m).size).toBe(3)
    drawing.inks.forEach((ink, k) => {
      // The photo blurs, adds noise and JPEG: within a just-visible difference or two.
      expect(deltaE00(sep.inks[m[k]!]!.lab, hexLab(ink.hex))).toBeLessThan(4)
      expect(sep.inks[m[k]!]!.hex).toMatch(/^#[0-9a-f]{6}$/)
    })
  })

  it('gets at most 2 % of each layer\'s ink pixels wrong, yellow on white and red touching blue included', () => {
    const m = matchLayers(sep, drawing)
    drawing.inks.forEach((_, k) => {
      const layer = sep.inks[m[k]!]!
      expect(layer.mask).toHaveLength(drawing.width * drawing.height)
      expect(wrongShare(layer.mask, truth[k]!)).toBeLessThanOrEqual(0.02)
    })
  })

  it('gets at most 2 % of the whole drawing wrong when the layers are stacked', () => {
    const m = matchLayers(sep, drawing)
    const truthLabel = new Uint8Array(drawing.width * drawing.height).fill(PAPER)
    truth.forEach((mask, k) => { for (let i = 0; i < mask.length; i++) if (mask[i]) truthLabel[i] = m[k]! })
    let wrong = 0, ink = 0
    for (let i = 0; i < truthLabel.length; i++) {
      if (sep.labels[i] !== truthLabel[i]) wrong++
      if (truthLabel[i] !== PAPER) ink++
    }
    expect(wrong / ink).toBeLessThanOrEqual(0.02)
  })

  it('gives pixel counts and shares that add up with the masks', () => {
    let sum = 0
    for (const layer of sep.inks) {
      const count = layer.mask.reduce((s, v) => s + v, 0)
      expect(layer.pixels).toBe(count)
      expect(layer.share).toBeCloseTo(count / layer.mask.length, 10)
      sum += count
    }
    expect(sum).toBe(sep.labels.reduce((s, v) => s + (v === PAPER ? 0 : 1), 0))
  })

  it('gives the same layers twice', async () => {
    const again = await separateColours({ data: rgb, width: drawing.width, height: drawing.height, channels: 3 })
    expect(Buffer.from(again.labels).equals(Buffer.from(sep.labels))).toBe(true)
    expect(again.inks.map((i) => i.hex)).toEqual(sep.inks.map((i) => i.hex))
  })

  it('follows a count: two inks join the nearest pair', async () => {
    const two = await separateColours({ data: rgb, width: drawing.width, height: drawing.height, channels: 3 }, { count: 2 })
    expect(two.inks).toHaveLength(2)
    const one = await separateColours({ data: rgb, width: drawing.width, height: drawing.height, channels: 3 }, { count: 1 })
    expect(one.inks).toHaveLength(1)
    expect(one.sentence).toMatch(/^1 ink found: /)
  })

  it('takes picked colours as the inks, and the rest as paper', async () => {
    // A patch in the red disc and a pixel in the blue block.
    const picked = await separateColours({ data: rgb, width: drawing.width, height: drawing.height, channels: 3 }, { picks: [{ x: 380, y: 470, radius: 6 }, { x: 670, y: 540 }] })
    expect(picked.inks.map((i) => i.name).sort()).toEqual(['blue', 'red'])
    const red = picked.inks.find((i) => i.name === 'red')!
    expect(wrongShare(red.mask, truth[0]!)).toBeLessThanOrEqual(0.02)
    // The yellow star, not picked, is paper.
    let starAsInk = 0
    truth[2]!.forEach((v, i) => { if (v && picked.labels[i] !== PAPER) starAsInk++ })
    expect(starAsInk / truth[2]!.reduce((s, v) => s + v, 0)).toBeLessThan(0.02)
    // A count above the picks finds the remaining ink.
    const three = await separateColours({ data: rgb, width: drawing.width, height: drawing.height, channels: 3 }, { picks: [{ x: 380, y: 470, radius: 6 }], count: 3 })
    expect(new Set(three.inks.map((i) => i.name))).toEqual(new Set(['red', 'blue', 'yellow']))
  })

  it('merges two inks into one layer and drops one into the paper', async () => {
    const image = { data: rgb, width: drawing.width, height: drawing.height, channels: 3 as const }
    const red = sep.found.findIndex((f) => f.name === 'red')
    const blue = sep.found.findIndex((f) => f.name === 'blue')
    const yellow = sep.found.findIndex((f) => f.name === 'yellow')
    const merged = await separateColours(image, { merge: [[red, blue]] })
    expect(merged.inks).toHaveLength(2)
    const both = merged.inks.find((i) => i.from.includes(red))!
    expect(both.from.sort()).toEqual([red, blue].sort())
    const union = truth[0]!.map((v, i) => v | truth[1]![i]!)
    expect(wrongShare(both.mask, union)).toBeLessThanOrEqual(0.02)
    expect(merged.sentence).toMatch(/^2 inks found \(1 merged\): /)

    const dropped = await separateColours(image, { drop: [yellow] })
    expect(dropped.inks.map((i) => i.name).sort()).toEqual(['blue', 'red'])
    expect(dropped.sentence).toMatch(/^2 inks found \(1 dropped\): /)
    await expect(separateColours(image, { drop: [7] })).rejects.toThrow(RangeError)
  })
})

describe('a one-colour drawing', () => {
  it('comes out as exactly one layer, its mask within 2 % of the drawing', async () => {
    const d = blackDrawing()
    const [truth] = await trueMasks(d)
    const { rgb } = await photograph(d, { seed: 9 })
    const sep = await separateColours({ data: rgb, width: d.width, height: d.height, channels: 3 })
    expect(sep.inks).toHaveLength(1)
    expect(sep.inks[0]!.name).toBe('black')
    expect(wrongShare(sep.inks[0]!.mask, truth!)).toBeLessThanOrEqual(0.02)
  })

  it('on evenly lit white paper, and given with an alpha channel', async () => {
    const d = blackDrawing(500, 375)
    const [truth] = await trueMasks(d)
    const { rgb } = await photograph(d, { tint: [1, 1, 1], falloff: 1, vignette: 0, noise: 2 })
    const rgba = new Uint8Array(d.width * d.height * 4)
    for (let i = 0; i < d.width * d.height; i++) { rgba.set(rgb.subarray(i * 3, i * 3 + 3), i * 4); rgba[i * 4 + 3] = 255 }
    const sep = await separateColours({ data: rgba, width: d.width, height: d.height, channels: 4 })
    expect(sep.inks).toHaveLength(1)
    expect(sep.paper.tint).toBeNull()
    expect(sep.sentence).toBe('1 ink found: black; the paper was left out.')
    expect(wrongShare(sep.inks[0]!.mask, truth!)).toBeLessThanOrEqual(0.02)
  })
})

describe('a line drawing: thin strokes in three inks', () => {
  it('finds black, green and pink, each layer within 2 % though its strokes are 7–12 pixels wide', async () => {
    const d: ColourDrawing = {
      width: 1000, height: 750,
      inks: [
        { hex: '#1c1b1f', body: '<path d="M100 100 L900 120 L880 650 L120 620 Z" fill="none" stroke-width="9"/><circle cx="500" cy="370" r="180" fill="none" stroke-width="7"/>' },
        { hex: '#2a8f3a', body: '<path d="M200 300 Q500 100 800 300" fill="none" stroke-width="12"/><rect x="420" y="300" width="160" height="140" stroke="none"/>' },
        { hex: '#e04a8a', body: '<path d="M200 500 Q500 700 800 500" fill="none" stroke-width="10"/>' },
      ],
    }
    const truth = await trueMasks(d)
    const { rgb } = await photograph(d)
    const sep = await separateColours({ data: rgb, width: d.width, height: d.height, channels: 3 })
    expect(new Set(sep.inks.map((i) => i.name))).toEqual(new Set(['black', 'green', 'pink']))
    const m = matchLayers(sep, d)
    // The grey edge of a black line is a blend of black and paper, not the ink nearest to grey.
    d.inks.forEach((_, k) => expect(wrongShare(sep.inks[m[k]!]!.mask, truth[k]!)).toBeLessThanOrEqual(0.02))
  })
})

describe('bare paper and bad choices', () => {
  it('finds no ink on a shaded blank sheet', async () => {
    const d: ColourDrawing = { width: 400, height: 300, inks: [] }
    const { rgb } = await photograph(d)
    const sep = await separateColours({ data: rgb, width: d.width, height: d.height, channels: 3 })
    expect(sep.inks).toHaveLength(0)
    expect(sep.sentence).toBe('No ink found: the picture reads as bare paper.')
  })

  it('refuses a count outside 1–6 and a pick outside the picture', async () => {
    const image = { data: new Uint8Array(30 * 20 * 3).fill(255), width: 30, height: 20, channels: 3 as const }
    await expect(separateColours(image, { count: 7 })).rejects.toThrow(RangeError)
    await expect(separateColours(image, { count: 0 })).rejects.toThrow(RangeError)
    await expect(separateColours(image, { picks: [{ x: 30, y: 3 }] })).rejects.toThrow(RangeError)
  })

  it('says what it found in a plain sentence', () => {
    expect(separationSentence(['red', 'blue', 'yellow'], { tint: 'cream', shadingL: 2 })).toBe('3 inks found: red, blue and yellow; the paper\'s cream tint was left out.')
    expect(separationSentence(['green'], { tint: null, shadingL: 20 })).toBe('1 ink found: green; the paper and its shading were left out.')
  })
})
