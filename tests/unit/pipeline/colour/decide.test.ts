// The decision whether inks are layers, on masks drawn in code: the paper's lines, small
// colours and greys are not layers of their own.
import { describe, expect, it } from 'vitest'
import { decideLayers, paperLineShare, type InkToJudge } from '../../../../server/pipeline/colour/decide'
import { srgbToLab } from '../../../../server/pipeline/colour/lab'

const W = 600, H = 800

function mask(paint: (x: number, y: number) => boolean): Uint8Array {
  const m = new Uint8Array(W * H)
  for (let y = 0; y < H; y++) for (let x = 0; x < W; x++) if (paint(x, y)) m[y * W + x] = 1
  return m
}

const grid = mask((x, y) => x % 25 < 2 || y % 25 < 2)
const margin = mask((x) => x >= 80 && x < 86)
const disc = mask((x, y) => (x - 300) ** 2 + (y - 400) ** 2 < 150 ** 2)
const square = mask((x, y) => x > 100 && x < 250 && y > 100 && y < 250)
const speck = mask((x, y) => x > 500 && x < 506 && y > 700 && y < 706)

function ink(name: string, rgb: [number, number, number], m: Uint8Array): InkToJudge {
  let n = 0
  for (const v of m) n += v
  return { name, lab: srgbToLab(...rgb), share: n / m.length, mask: m }
}

describe('paper lines', () => {
  it('a grid is the paper\'s, a lone line across the sheet too, a drawing is not', () => {
    expect(paperLineShare(grid, W, H)).toBeGreaterThan(0.8)
    expect(paperLineShare(margin, W, H)).toBe(1)
    expect(paperLineShare(disc, W, H)).toBeLessThan(0.05)
    expect(paperLineShare(square, W, H)).toBeLessThan(0.05)
  })
})

describe('which inks are layers', () => {
  it('a black drawing on blue grid paper with a red margin line is one colour', () => {
    const d = decideLayers([ink('light blue', [127, 178, 230], grid), ink('red', [224, 122, 122], margin), ink('black', [20, 20, 20], disc)], W, H)
    expect(d.layered).toBe(false)
    expect(d.leftOut.map((l) => l.reason)).toEqual(['paper lines', 'paper lines'])
  })

  it('black and grey are one ink; a colour beside them is a second', () => {
    const greys = [ink('grey', [150, 150, 150], square), ink('black', [20, 20, 20], disc)]
    expect(decideLayers(greys, W, H).layered).toBe(false)
    const d = decideLayers([...greys, ink('red', [216, 38, 46], mask((x, y) => y > 600 && y < 700 && x > 100 && x < 500))], W, H)
    expect(d.layered).toBe(true)
    expect(d.groups).toEqual([[0, 1], [2]])
  })

  it('a speck of colour under the share is left out', () => {
    const d = decideLayers([ink('red', [216, 38, 46], disc), ink('blue', [29, 79, 184], speck)], W, H)
    expect(d.layered).toBe(false)
    expect(d.leftOut).toEqual([{ index: 1, reason: 'too small' }])
  })
})
