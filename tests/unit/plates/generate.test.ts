// Plates generated from invented team numbers (no real team's) against the presets.
import sharp from 'sharp'
import { svgPathProperties } from 'svg-path-properties'
import { describe, expect, it } from 'vitest'
import { readCleanVector, readSvgRoot } from '../../../server/cutsheet/path'
import { loadPlateFont } from '../../../server/plates/font'
import { DEFAULT_CORNER_RADIUS_MM, PlateRequestError, generatePlate, type GeneratedPlate, type PlateRequest } from '../../../server/plates/generate'
import { measureLayer } from '../../../server/plates/measure'
import { lengthMm, presetProfile, type RuleProfile } from '../../../shared/plates/profiles'

const font = loadPlateFont()
const FTC = presetProfile('ftc-2025-26')!, VEX = presetProfile('v5rc-2024-25')!, FRC = presetProfile('frc-2023')!
const plate = (teamNumber: string, profile: RuleProfile, more: Partial<PlateRequest> = {}) => generatePlate({ teamNumber, profile, font, ...more })
const numerals = (p: GeneratedPlate) => p.layers.find((l) => l.role === 'numerals')!
const background = (p: GeneratedPlate) => p.layers.find((l) => l.role === 'background')!

/**
 * Height of the ink of a one-glyph layer as librsvg paints it (through sharp), at 50 px/mm over
 * a window around the ink: the sum over rows of each row's largest coverage. A flat top or
 * bottom edge counts its partial row exactly; a round one loses less than a pixel (0.02 mm).
 */
async function paintedInkHeightMm(svg: string, bounds: { minX: number; minY: number; maxX: number; maxY: number }): Promise<number> {
  const k = 50, pad = 1
  const x = bounds.minX - pad, y = bounds.minY - pad
  const wPx = Math.ceil((bounds.maxX - bounds.minX + 2 * pad) * k), hPx = Math.ceil((bounds.maxY - bounds.minY + 2 * pad) * k)
  const paths = [...svg.matchAll(/<path\b[^>]*\bd="([^"]*)"/g)].map((m) => `<path d="${m[1]}" fill-rule="evenodd"/>`).join('')
  const doc = `<svg xmlns="http://www.w3.org/2000/svg" width="${wPx}" height="${hPx}" viewBox="${x} ${y} ${wPx / k} ${hPx / k}">${paths}</svg>`
  const alpha = await sharp(Buffer.from(doc)).ensureAlpha().extractChannel(3).raw().toBuffer()
  let rows = 0
  for (let r = 0; r < hPx; r++) {
    let m = 0
    for (let c = 0; c < wPx; c++) m = Math.max(m, alpha[r * wPx + c]!)
    rows += m / 255
  }
  return rows / k
}

describe('generatePlate: size and numeral height', () => {
  // The asked height is the outside reference; the vector is measured two ways: its curves'
  // bounding boxes read back from the SVG, and librsvg's painting of it.
  it.each([
    ['FTC', '8', 50.8, FTC],
    ['FTC', '1', 44.45, FTC],
    ['VEX', '2', 30, VEX],
    ['FRC', '4', 101.6, FRC],
  ] as const)('%s "%s" at %s mm: numeral height within 0.05 mm, from the bounding boxes and as painted', async (_, n, h, profile) => {
    const p = plate(n, profile, { numeralHeightMm: h })
    const m = await measureLayer(numerals(p).svg, { stroke: false })
    expect(Math.abs(m.tallestPieceMm! - h)).toBeLessThanOrEqual(0.05)
    expect(Math.abs(await paintedInkHeightMm(numerals(p).svg, m.inkBounds!) - h)).toBeLessThanOrEqual(0.05)
  })

  it('scales by the tallest glyph of the number, so a flat-topped number reaches the asked height too', async () => {
    // "1", "4" and "7" have flat tops and bottoms; "0" overshoots both ways: each number's own
    // tallest glyph is the asked height.
    for (const n of ['147', '1470', '2']) {
      const m = await measureLayer(numerals(plate(n, FTC, { numeralHeightMm: 57.15 })).svg, { stroke: false })
      expect(Math.abs(m.tallestPieceMm! - 57.15), n).toBeLessThanOrEqual(0.05)
    }
  })

  it('centres the numerals with at least the rule\'s margin, on a plate at least the rule\'s size', async () => {
    for (const [profile, n] of [[FTC, '5678'], [VEX, '9012C'], [FTC, '31']] as const) {
      const p = plate(n, profile)
      const m = await measureLayer(numerals(p).svg, { stroke: false })
      const b = m.inkBounds!
      const margin = lengthMm(profile.plate.margin?.value ?? { value: 6, unit: 'mm' })
      expect(m.marginMm!, n).toBeGreaterThanOrEqual(margin - 0.01)
      expect(Math.abs(b.minX - (p.widthMm - b.maxX)), `${n} left = right`).toBeLessThanOrEqual(0.02)
      expect(Math.abs(b.minY - (p.heightMm - b.maxY)), `${n} top = bottom`).toBeLessThanOrEqual(0.02)
      expect(p.widthMm).toBeGreaterThanOrEqual(lengthMm(profile.plate.minWidth!.value))
      expect(p.heightMm).toBeGreaterThanOrEqual(lengthMm(profile.plate.minHeight!.value))
    }
  })

  it('chooses the height that fits the smallest plate, within the rule\'s range', () => {
    // FTC "31": fits 6.5 × 2.5 in less ¼ in margins by height: the ink box is 2 in tall.
    const short = plate('31', FTC)
    expect(short.grown).toBe(false)
    expect([short.widthMm, short.heightMm]).toEqual([165.1, 63.5])
    // FTC "56789": too wide to fit at 1.75 in, so the numerals stay at the rule's least height and the plate grows.
    const long = plate('56789', FTC)
    expect(long.numeralHeightMm).toBeCloseTo(44.45, 9)
    expect(long.grown).toBe(true)
    expect(long.heightMm).toBe(63.5)
    expect(long.widthMm).toBeGreaterThan(165.1)
    // FRC states no plate: the least height, the plate is the numerals and the margin.
    const frc = plate('250', FRC)
    expect(frc.numeralHeightMm).toBe(101.6)
    expect(frc.layers.map((l) => l.role)).toEqual(['numerals'])
  })

  it('refuses what the rules do not allow, in a sentence', () => {
    expect(() => plate('1234', FTC, { numeralHeightMm: 80 })).toThrow(PlateRequestError)
    expect(() => plate('1234', FRC, { numeralHeightMm: 90 })).toThrow(/outside the rules/)
    expect(() => plate('1234', FTC, { marginMm: 3 })).toThrow(/below the 6.35 mm the rules ask for/)
    expect(() => plate('1234', FTC, { numeralColour: 'black' })).toThrow(/not allowed: the rules ask for white/)
    expect(() => plate('1234', VEX, { background: { colour: 'green' } })).toThrow(/red or blue/)
    expect(() => plate('12-34', FTC)).toThrow(/team number/)
    expect(() => plate('1234', FTC, { cornerRadiusMm: 40 })).toThrow(RangeError)
    expect(plate(' 4321b ', VEX).teamNumber).toBe('4321B')
  })
})

describe('generatePlate: layers as clean vectors', () => {
  it('writes each layer in the clean vector\'s form, in register, the same bytes every time', () => {
    const p = plate('6039', VEX, { background: { colour: 'blue' } })
    expect(p.layers.map((l) => [l.role, l.colour])).toEqual([['background', 'blue'], ['numerals', 'white']])
    for (const l of p.layers) {
      // SVG 1.1 §7: width/height in mm with a viewBox of the same size, so one user unit is 1 mm
      const root = readSvgRoot(l.svg)
      expect(root.widthMm).toBe(p.widthMm)
      expect(root.heightMm).toBe(p.heightMm)
      expect(root.viewBox).toEqual({ x: 0, y: 0, width: p.widthMm, height: p.heightMm })
      expect(root.mmPerUnit).toBe(1)
      expect(l.svg).toMatch(/^<svg xmlns="http:\/\/www\.w3\.org\/2000\/svg" width="[\d.]+mm" height="[\d.]+mm" viewBox="0 0 [\d.]+ [\d.]+">(<path [^>]*\/>)+<\/svg>\n$/)
      expect(l.svg).toContain('fill-rule="evenodd"')
      // the cut sheet reader takes it as it takes a traced revision
      expect(readCleanVector(l.svg).curves.length).toBe(l.curvesMm.length)
      // every coordinate of the curves is on the 0.01 mm grid
      for (const c of l.curvesMm) for (const s of c.segments) for (const v of [s.from.x, s.from.y, s.to.x, s.to.y]) expect(Math.abs(v * 100 - Math.round(v * 100))).toBeLessThan(1e-6)
    }
    expect(plate('6039', VEX, { background: { colour: 'blue' } })).toEqual(p)
  })

  it('counts pieces and holes as worked by hand, and its cut length agrees with svg-path-properties', async () => {
    // "6039": 6 (one counter), 0 (one), 3 (none), 9 (one): 4 pieces, 3 holes.
    const p = plate('6039', VEX)
    const m = await measureLayer(numerals(p).svg, { stroke: false })
    expect([m.pieces, m.holes]).toEqual([4, 3])
    expect(m.nodes).toBe(numerals(p).nodeCount)
    // cut length against a general-purpose SVG path-length library (svg-path-properties), within 0.1 %
    const d = [...numerals(p).svg.matchAll(/\bd="([^"]*)"/g)].map((x) => x[1]).join('')
    const ref = new svgPathProperties(d).getTotalLength()
    expect(Math.abs(m.cutLengthMm - ref) / ref).toBeLessThan(0.001)
  })

  it('draws the background as a rounded rectangle: area and perimeter as handbook geometry gives them', async () => {
    // A W × H rectangle with corners of radius r: area W·H − (4 − π)r², perimeter 2(W + H) − 8r + 2πr.
    const p = plate('77', FTC)
    const r = DEFAULT_CORNER_RADIUS_MM, W = p.widthMm, H = p.heightMm
    const m = await measureLayer(background(p).svg, { stroke: false })
    expect([m.pieces, m.holes]).toEqual([1, 0])
    expect(m.inkAreaMm2).toBeCloseTo(W * H - (4 - Math.PI) * r * r, 1)
    // The corners are cubics (kappa 0.5523), a little longer than true quarter circles, and on the 0.01 mm grid.
    expect(Math.abs(m.cutLengthMm - (2 * (W + H) - 8 * r + 2 * Math.PI * r))).toBeLessThan(0.02)
    const square = await measureLayer(background(plate('77', FTC, { cornerRadiusMm: 0 })).svg, { stroke: false })
    expect(square.inkAreaMm2).toBeCloseTo(W * H, 6)
  })

  it('knocks the numerals out of the background when asked: the two layers tile the plate', async () => {
    const under = plate('6039', FTC)
    const out = plate('6039', FTC, { background: { style: 'knock-out' } })
    const [plateArea, numeralArea, knocked] = await Promise.all([
      measureLayer(background(under).svg, { stroke: false }), measureLayer(numerals(out).svg, { stroke: false }), measureLayer(background(out).svg, { stroke: false }),
    ])
    expect(knocked.inkAreaMm2 + numeralArea.inkAreaMm2).toBeCloseTo(plateArea.inkAreaMm2, 2)
    // the plate, and the three counters left standing as islands; the four numerals as holes
    expect([knocked.pieces, knocked.holes]).toEqual([4, 4])
  })
})
