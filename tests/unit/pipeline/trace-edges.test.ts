// Ink that touches the edges of the image, traced by us and by the reference tracer.
//
// Reference: P. Selinger's potrace (Debian package "potrace", the C implementation of "Potrace:
// a polygon-based tracing algorithm", 2003), on the same bitmap as PBM with the same turdsize
// (-t), alphamax (-a) and opttolerance (-O). Outside the image counts as paper in potrace. Its
// GeoJSON output gives one feature per piece of ink with its holes as inner rings (so it says
// how many pieces and holes there are); its SVG output, at 1/1000 px (-u 1000), gives the
// curves whose areas we compare.
import { describe, expect, it } from 'vitest'
import { curveSignedArea, measureCurves } from '../../../server/pipeline/geometry'
import { parsePathData } from '../../../server/pipeline/svgpath'
import { traceBitmap, type ClosedCurve } from '../../../server/pipeline/trace'
import { mulberry32, runPotrace, svgDoc, svgToBitmap } from './helpers'

interface Reference { pieces: number, holes: number, areaPx: number, curveAreasPx: number[] }

interface GeoJson { features: Array<{ geometry: { type: string, coordinates: unknown[] } }> }

function reference(bitmap: Uint8Array, width: number, height: number, turdSize: number, alphaMax: number, optTolerance: number): Reference {
  const params = ['-t', String(turdSize), '-a', String(alphaMax), '-O', String(optTolerance)]
  const geo = JSON.parse(runPotrace(bitmap, width, height, ['-b', 'geojson', ...params])) as GeoJson
  let holes = 0
  for (const f of geo.features) {
    expect(f.geometry.type).toBe('Polygon')
    holes += f.geometry.coordinates.length - 1
  }
  const svg = runPotrace(bitmap, width, height, ['-b', 'svg', '-u', '100000', ...params])
  const scale = /scale\(([\d.]+),-([\d.]+)\)/.exec(svg)!
  const k = Number(scale[1])
  expect(Number(scale[2])).toBe(k)
  const curveAreas: number[] = []
  let signed = 0
  for (const m of svg.matchAll(/\sd="([^"]*)"/g)) {
    for (const sub of parsePathData(m[1]!)) {
      const a = curveSignedArea(sub) * k * k
      signed += a // holes run the other way round: their areas subtract
      curveAreas.push(Math.abs(a))
    }
  }
  return { pieces: geo.features.length, holes, areaPx: Math.abs(signed), curveAreasPx: curveAreas.sort((a, b) => a - b) }
}

const DEFAULTS = { speckFilterMm2: 0, cornerRounding: 1, curveTolerance: 0.2 }

function trace(bitmap: Uint8Array, width: number, height: number, settings = DEFAULTS) {
  // pxPerMm = 1: the speck filter's mm² are px², and the measurements come out in px.
  return traceBitmap({ bitmap, width, height, pxPerMm: 1 }, settings)
}

/** Areas of every curve, smallest first, px². */
const curveAreas = (curves: ClosedCurve[]) => curves.map((c) => Math.abs(curveSignedArea(c))).sort((a, b) => a - b)

function compare(bitmap: Uint8Array, width: number, height: number, settings = DEFAULTS, exactCurves = true) {
  const outline = trace(bitmap, width, height, settings)
  const p = outline.parameters
  const ours = measureCurves(outline.curves, 1)
  const theirs = reference(bitmap, width, height, p.turdSize, p.alphaMax, p.optTolerance)
  expect(ours.pieces).toBe(theirs.pieces)
  expect(ours.holes).toBe(theirs.holes)
  const areas = curveAreas(outline.curves)
  expect(areas.length).toBe(theirs.curveAreasPx.length)
  if (exactCurves) {
    // Their coordinates are rounded to 1/100000 px, which moves an area by at most about
    // 1e-5 px² per px of the curve's length.
    expect(Math.abs(ours.inkAreaMm2 - theirs.areaPx)).toBeLessThan(1e-5 * ours.cutLengthMm)
    areas.forEach((a, i) => expect(Math.abs(a - theirs.curveAreasPx[i]!)).toBeLessThan(1e-5 * ours.cutLengthMm))
  }
  // Every curve stays inside the image (a curve rounding a corner at an edge may bulge out by
  // a fraction of a pixel, as the reference's do).
  expect(ours.bounds!.minX).toBeGreaterThan(-0.25)
  expect(ours.bounds!.minY).toBeGreaterThan(-0.25)
  expect(ours.bounds!.maxX).toBeLessThan(width + 0.25)
  expect(ours.bounds!.maxY).toBeLessThan(height + 0.25)
  return { ours, theirs }
}

describe('ink touching the edges of the image, against Debian\'s potrace', () => {
  it('a frame around the whole image, with a disc and a ring inside', async () => {
    const { bitmap, width, height } = await svgToBitmap(svgDoc(240, 160,
      '<rect x="0" y="0" width="240" height="160" fill="none" stroke="#000" stroke-width="24"/>'
      + '<circle cx="80" cy="80" r="30"/><circle cx="170" cy="80" r="30" fill="none" stroke="#000" stroke-width="10"/>'))
    const { ours } = compare(bitmap, width, height)
    expect(ours.pieces).toBe(3) // frame, disc, ring
    expect(ours.holes).toBe(2) // the frame's inside, the ring's inside
  })

  it('grid-like ink: lines running from edge to edge', async () => {
    let body = ''
    for (let x = 0; x <= 240; x += 23) body += `<rect x="${x}" y="0" width="3" height="160"/>`
    for (let y = 5; y <= 160; y += 19) body += `<rect x="0" y="${y}" width="240" height="2"/>`
    body += '<path d="M0 150 L240 10" stroke="#000" stroke-width="4"/>'
    const { bitmap, width, height } = await svgToBitmap(svgDoc(240, 160, body))
    const { ours } = compare(bitmap, width, height)
    expect(ours.pieces).toBe(1)
    expect(ours.holes).toBeGreaterThan(80)
  })

  it('shapes cut by every edge and corner, one-pixel lines along the edges', async () => {
    const { bitmap, width, height } = await svgToBitmap(svgDoc(200, 120,
      '<circle cx="0" cy="0" r="25"/><circle cx="200" cy="0" r="18"/><circle cx="0" cy="120" r="14"/><circle cx="200" cy="120" r="30"/>'
      + '<circle cx="100" cy="0" r="20"/><circle cx="100" cy="120" r="12"/><circle cx="0" cy="60" r="9"/>'
      + '<rect x="199" y="30" width="1" height="60"/><rect x="40" y="119" width="40" height="1"/><rect x="130" y="0" width="30" height="1"/>'
      + '<text x="150" y="75" font-family="DejaVu Sans" font-size="40" font-weight="bold">AB</text>'))
    compare(bitmap, width, height)
    compare(bitmap, width, height, { speckFilterMm2: 10, cornerRounding: 0.5, curveTolerance: 0.4 })
  })

  it('a bar along the left edge, a staircase along the right edge', () => {
    const width = 50, height = 30
    const bitmap = new Uint8Array(width * height)
    for (let y = 0; y < height; y++) {
      for (let x = 0; x < width; x++) {
        if (x < 6 || x >= width - 1 - (y % 7) || (x >= 20 && x < 30 && y >= 10 && y < 20)) bitmap[y * width + x] = 1
      }
    }
    expect(compare(bitmap, width, height).ours.pieces).toBe(3)
  })

  it('noise over the whole image, every edge included', () => {
    // On noise, the port and the C tracer can choose different optimal polygons for a large
    // path where several are equally good (the port works in y-down coordinates, potrace in
    // y-up ones, so ties fall the other way). That happens away from the edges too: so here
    // the counts must be identical, the ink area within 0.1 %, and our outline of the noise
    // must have the same curves (areas and segment counts) as our outline of the same noise
    // inside a paper border.
    const rnd = mulberry32(21)
    const width = 61, height = 43, pad = 3
    for (const density of [0.3, 0.5, 0.7]) {
      const bitmap = new Uint8Array(width * height).map(() => (rnd() < density ? 1 : 0))
      const framed = new Uint8Array((width + 2 * pad) * (height + 2 * pad))
      for (let y = 0; y < height; y++) framed.set(bitmap.subarray(y * width, (y + 1) * width), (y + pad) * (width + 2 * pad) + pad)
      for (const settings of [DEFAULTS, { speckFilterMm2: 3, cornerRounding: 1.2, curveTolerance: 0.2 }]) {
        const { ours, theirs } = compare(bitmap, width, height, settings, false)
        expect(Math.abs(ours.inkAreaMm2 / theirs.areaPx - 1)).toBeLessThan(0.001)
        const inFrame = trace(framed, width + 2 * pad, height + 2 * pad, settings)
        const here = trace(bitmap, width, height, settings)
        expect(here.curves.length).toBe(inFrame.curves.length)
        const framedAreas = curveAreas(inFrame.curves)
        curveAreas(here.curves).forEach((a, i) => expect(Math.abs(a - framedAreas[i]!)).toBeLessThan(1e-9))
        expect(here.curves.map((c) => c.segments.length)).toEqual(inFrame.curves.map((c) => c.segments.length))
        expect(here.curves.map((c) => c.sign)).toEqual(inFrame.curves.map((c) => c.sign))
      }
    }
  })

  it('an image that is all ink, and all ink but a hole', () => {
    const width = 40, height = 25
    const full = new Uint8Array(width * height).fill(1)
    const { ours } = compare(full, width, height)
    expect(ours.pieces).toBe(1)
    expect(Math.abs(ours.inkAreaMm2 - width * height)).toBeLessThan(1e-9)
    const holed = full.slice()
    for (let y = 8; y < 16; y++) for (let x = 10; x < 30; x++) holed[y * width + x] = 0
    expect(compare(holed, width, height).ours.holes).toBe(1)
  })
})
