import { createRequire } from 'node:module'
import { describe, expect, it } from 'vitest'
import { decompose, type PortPath } from '../../../server/pipeline/decompose'
import { mulberry32, svgDoc, svgToBitmap } from './helpers'

const require = createRequire(import.meta.url)
interface PortBitmap { data: Uint8Array }
interface PortInstance { _luminanceData: PortBitmap | null, _imageLoaded: boolean, _pathlist: PortPath[], _bmToPathlist(): void }
const { Potrace } = require('potrace') as { Potrace: new (o: Record<string, unknown>) => PortInstance }
const PortBitmapClass = require('potrace/lib/types/Bitmap.js') as new (w: number, h: number) => PortBitmap

/** The npm potrace port's own decomposition (Potrace#_bmToPathlist, potrace 2.1.8). */
function portPaths(bitmap: Uint8Array, width: number, height: number, turdSize: number): PortPath[] {
  const p = new Potrace({ turnPolicy: 'minority', turdSize, threshold: 128, blackOnWhite: true })
  const lum = new PortBitmapClass(width, height)
  for (let i = 0; i < bitmap.length; i++) lum.data[i] = bitmap[i] ? 0 : 255
  p._luminanceData = lum
  p._imageLoaded = true
  p._bmToPathlist()
  return p._pathlist
}

function ourPaths(bitmap: Uint8Array, width: number, height: number, turdSize: number): PortPath[] {
  const out: PortPath[] = []
  decompose(bitmap, width, height, turdSize, (p) => out.push(p))
  return out
}

/** The bitmap inside a paper frame wider than anything the port looks at past an edge. */
function framed(bitmap: Uint8Array, width: number, height: number, pad = 6) {
  const w = width + 2 * pad, h = height + 2 * pad
  const out = new Uint8Array(w * h)
  for (let y = 0; y < height; y++) out.set(bitmap.subarray(y * width, (y + 1) * width), (y + pad) * w + pad)
  return { bitmap: out, width: w, height: h }
}

function expectSamePaths(ours: PortPath[], theirs: PortPath[]) {
  expect(ours.length).toBe(theirs.length)
  ours.forEach((a, i) => {
    const b = theirs[i]!
    expect([a.len, a.area, a.minX, a.maxX, a.minY, a.maxY]).toEqual([b.len, b.area, b.minX, b.maxX, b.minY, b.maxY])
    expect(a.pt.map((p) => p.x * 65536 + p.y)).toEqual(b.pt.map((p) => p.x * 65536 + p.y))
  })
}

describe('decomposition into boundary paths', () => {
  // Reference: the npm potrace port's own decomposition, on bitmaps framed with paper so that
  // its reading past the right edge cannot come into play.
  it('finds the port\'s paths, point for point, on noise', () => {
    const rnd = mulberry32(31)
    for (const density of [0.2, 0.5, 0.8]) {
      const raw = new Uint8Array(70 * 50).map(() => (rnd() < density ? 1 : 0))
      const { bitmap, width, height } = framed(raw, 70, 50)
      for (const turd of [0, 2, 10]) expectSamePaths(ourPaths(bitmap, width, height, turd), portPaths(bitmap, width, height, turd))
    }
  })

  it('finds the port\'s paths, point for point, on a drawing with holes and islands', async () => {
    const d = await svgToBitmap(svgDoc(300, 200, '<circle cx="80" cy="100" r="70"/><circle cx="80" cy="100" r="40" fill="#fff"/><circle cx="80" cy="100" r="15"/>'
      + '<text x="160" y="150" font-family="DejaVu Sans" font-size="120">&amp;</text>'))
    const { bitmap, width, height } = framed(d.bitmap, d.width, d.height)
    const ours = ourPaths(bitmap, width, height, 5)
    expectSamePaths(ours, portPaths(bitmap, width, height, 5))
    // and marks each path by the pixel it starts at: outer boundaries '+', holes '-'
    expect(ours.map((p) => p.sign).join('')).toMatch(/^\+-\+/)
  })
})
