// A plate as one layered decal: background and numerals on one framed canvas with the same
// registration marks, measured inside the plate. Team numbers are invented.
import { svgPathProperties } from 'svg-path-properties'
import { describe, expect, it } from 'vitest'
import { readSvgRoot } from '../../../server/cutsheet/path'
import { registrationMarkPositions } from '../../../server/pipeline/colour/marks'
import { loadPlateFont } from '../../../server/plates/font'
import { framePlate, generatePlate } from '../../../server/plates/generate'
import { measureLayer } from '../../../server/plates/measure'
import { presetProfile } from '../../../shared/plates/profiles'

const FTC = presetProfile('ftc-2025-26')!
const plate = generatePlate({ teamNumber: '4711', profile: FTC, font: loadPlateFont(), numeralHeightMm: 50, background: { colour: 'red' } })
const framed = framePlate(plate)

interface Part { x0: number; y0: number; minX: number; minY: number; maxX: number; maxY: number }

/**
 * The outline's pieces as svg-path-properties (npm) reads the path, independent of our own
 * reader: each part sampled every 0.05 mm for its box.
 */
function parts(svg: string): Part[] {
  const out: Part[] = []
  for (const m of svg.matchAll(/<path\b[^>]*\bd="([^"]+)"/g)) {
    for (const part of new svgPathProperties(m[1]!).getParts()) {
      const box = { x0: part.start.x, y0: part.start.y, minX: Infinity, minY: Infinity, maxX: -Infinity, maxY: -Infinity }
      for (let s = 0; s <= part.length; s += 0.05) {
        const p = part.getPointAtLength(Math.min(s, part.length))
        box.minX = Math.min(box.minX, p.x); box.maxX = Math.max(box.maxX, p.x)
        box.minY = Math.min(box.minY, p.y); box.maxY = Math.max(box.maxY, p.y)
      }
      out.push(box)
    }
  }
  return out
}

const outsidePlate = (p: Part) => p.maxX < framed.plateBox.x0 || p.minX > framed.plateBox.x1 || p.maxY < framed.plateBox.y0 || p.minY > framed.plateBox.y1

describe('framePlate: a plate as one layered decal', () => {
  it('puts both layers on one canvas, background first, with the marks at the same coordinates in each', () => {
    expect(framed.layers.map((l) => `${l.role} ${l.colour}`)).toEqual(['background red', 'numerals white'])
    const sizes = framed.layers.map((l) => readSvgRoot(l.svg))
    for (const s of sizes) expect([s.widthMm, s.heightMm]).toEqual([framed.frame.widthMm, framed.frame.heightMm])
    // Three marks outside the plate, which is the framed canvas grown round it.
    expect(registrationMarkPositions(framed.frame)).toHaveLength(3)
    expect(framed.frame.widthMm).toBeGreaterThan(plate.widthMm)
    const marks = framed.layers.map((l) => parts(l.svg).filter(outsidePlate).map((p) => [p.x0, p.y0]))
    // svg-path-properties' parts are segments: every layer has the same segments outside the plate, drawn alike.
    expect(marks[0]!.length).toBeGreaterThanOrEqual(6)
    expect(marks[1]).toHaveLength(marks[0]!.length)
    marks[1]!.forEach((xy, i) => {
      expect(Math.abs(xy[0]! - marks[0]![i]![0]!)).toBeLessThanOrEqual(0.01)
      expect(Math.abs(xy[1]! - marks[0]![i]![1]!)).toBeLessThanOrEqual(0.01)
    })
  })

  it('keeps the numerals at the asked height inside the plate, measured from the framed vector', async () => {
    const box = framed.plateBox
    const m = await measureLayer(framed.layers[1]!.svg, { stroke: false, within: { minX: box.x0, minY: box.y0, maxX: box.x1, maxY: box.y1 } })
    const unframed = await measureLayer(plate.layers[1]!.svg, { stroke: false })
    expect([m.widthMm, m.heightMm]).toEqual([plate.widthMm, plate.heightMm])
    expect(Math.abs(m.tallestPieceMm! - 50)).toBeLessThanOrEqual(0.05)
    expect(Math.abs(m.marginMm! - unframed.marginMm!)).toBeLessThanOrEqual(0.01)
    expect(m.pieces).toBe(unframed.pieces)
    // The same height read by svg-path-properties: the pieces inside the plate, top to bottom.
    const inside = parts(framed.layers[1]!.svg).filter((p) => !outsidePlate(p))
    const h = Math.max(...inside.map((p) => p.maxY)) - Math.min(...inside.map((p) => p.minY))
    expect(Math.abs(h - 50)).toBeLessThanOrEqual(0.05)
  })

  it('draws the stacked vector as one group per layer in the layers\' colours, bottom first', () => {
    const groups = [...framed.stackedSvg.matchAll(/<g id="([^"]+)" fill="([^"]+)"/g)].map((g) => `${g[1]} ${g[2]}`)
    expect(groups).toEqual([`dw-layer-1 ${framed.layers[0]!.hex}`, `dw-layer-2 ${framed.layers[1]!.hex}`])
    expect(readSvgRoot(framed.stackedSvg).widthMm).toBe(framed.frame.widthMm)
  })

  it('a knocked-out background runs the overlap under the numerals\' edges', async () => {
    const knocked = generatePlate({ teamNumber: '4711', profile: FTC, font: loadPlateFont(), numeralHeightMm: 50, background: { colour: 'blue', style: 'knock-out' } })
    const f = framePlate(knocked)
    const box = { minX: f.plateBox.x0, minY: f.plateBox.y0, maxX: f.plateBox.x1, maxY: f.plateBox.y1 }
    const [bg, num] = await Promise.all([measureLayer(f.layers[0]!.svg, { stroke: false, within: box }), measureLayer(f.layers[1]!.svg, { stroke: false, within: box })])
    const plain = await measureLayer(knocked.layers[0]!.svg, { stroke: false })
    // The hole left for the numerals shrinks by the overlap d all round: the background gains
    // about the numerals' outline length × d (handbook offset geometry, d = 0.5 mm), less at
    // the numerals' inner corners.
    const gained = bg.inkAreaMm2 - plain.inkAreaMm2
    expect(f.stack[0]).toEqual({ mode: 'knock-out', overlapMm: 0.5 })
    expect(gained).toBeGreaterThan(0.9 * num.cutLengthMm * 0.5)
    expect(gained).toBeLessThan(1.02 * num.cutLengthMm * 0.5)
  })
})
