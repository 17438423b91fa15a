import { beforeAll, describe, expect, it } from 'vitest'
import { narrowestFeature } from '../../../server/pipeline/geometry'
import { thickenStrokes } from '../../../server/pipeline/thicken'
import { referenceNarrowest, svgDoc, svgToBitmap, type ReferenceNarrowest } from './helpers'

type Bitmap = { bitmap: Uint8Array, width: number, height: number }

// A pencil-like drawing: thin straight and curved lines, a dot, a thin line running into a
// large disc, a 6 px line passing near a large block.
const PENCIL = '<path d="M40 60 L360 80" stroke="#000" stroke-width="2.5" fill="none"/>'
  + '<path d="M40 140 C120 60 200 260 360 140" stroke="#000" stroke-width="4" fill="none"/>'
  + '<circle cx="100" cy="250" r="2"/><circle cx="130" cy="250" r="40"/><path d="M170 250 L350 260" stroke="#000" stroke-width="3"/>'
  + '<rect x="60" y="310" width="280" height="50"/><path d="M60 300 L340 200" stroke="#000" stroke-width="6"/>'

/** Pixels turned to ink; fails if any ink was taken away. */
const added = (before: Uint8Array, after: Uint8Array) => {
  let n = 0, lost = 0
  for (let i = 0; i < before.length; i++) {
    if (before[i] && !after[i]) lost++
    if (after[i] && !before[i]) n++
  }
  expect(lost).toBe(0)
  return n
}

describe('thickening thin strokes', () => {
  // Checked with the reference narrowest stroke: scikit-image's medial axis and SciPy's
  // Euclidean distance transform (reference/narrowest.py, Debian python3-skimage).
  const angles = [0, 9, 18, 27, 36, 45]
  const widths = [7, 12, 20]
  const thickened: Bitmap[][] = []
  let reference: ReferenceNarrowest[] = []
  beforeAll(async () => {
    for (const angle of angles) {
      const b = await svgToBitmap(svgDoc(400, 400, `<g transform="rotate(${angle} 200 200)">${PENCIL}</g>`))
      thickened.push(widths.map((w) => ({ ...b, bitmap: thickenStrokes(b.bitmap, b.width, b.height, w) })))
    }
    reference = referenceNarrowest(thickened.flat())
  }, 120_000)

  it('brings every stroke and dot to at least the asked width, at any angle', async () => {
    const drawn = await svgToBitmap(svgDoc(400, 400, PENCIL))
    expect(narrowestFeature(drawn.bitmap, 400, 400, 10)!.widthPx).toBeLessThan(3)
    thickened.forEach((row, a) => row.forEach((b, k) => {
      const label = `${angles[a]}°, ${widths[k]} px`
      expect(narrowestFeature(b.bitmap, b.width, b.height, 10)!.widthPx, label).toBeGreaterThanOrEqual(widths[k]!)
      expect(reference[a * widths.length + k]!.widthPx!, label).toBeGreaterThanOrEqual(widths[k]!)
    }))
  })

  it('leaves wide strokes and large shapes exactly as they were', async () => {
    const b = await svgToBitmap(svgDoc(400, 300, '<circle cx="90" cy="90" r="60"/><rect x="200" y="30" width="160" height="90"/>'
      + '<polygon points="200,150 229,240 324,240 247,296 276,386 200,330 124,386 153,296 76,240 171,240" transform="translate(0 -60) scale(1 0.8)"/>'
      + '<path d="M20 260 L380 230" stroke="#000" stroke-width="25"/>'))
    expect(Buffer.from(thickenStrokes(b.bitmap, b.width, b.height, 14)).equals(Buffer.from(b.bitmap))).toBe(true)
  })

  it('only adds ink, round the thin parts: a thin line grows, the block it touches keeps its corners', async () => {
    const b = await svgToBitmap(svgDoc(300, 200, '<rect x="150" y="40" width="120" height="120"/><path d="M20 100 L150 100" stroke="#000" stroke-width="3"/>'))
    const out = thickenStrokes(b.bitmap, b.width, b.height, 12)
    expect(added(b.bitmap, out)).toBeGreaterThan(800)
    // the block's corners and far sides are untouched: nothing added right of x = 150 + 7
    let changed = 0
    for (let y = 0; y < 200; y++) for (let x = 158; x < 300; x++) if (out[y * 300 + x] !== b.bitmap[y * 300 + x]) changed++
    expect(changed).toBe(0)
    // the line is about 12 px tall now and starts at most a disc radius before it did
    let top = 200, bottom = -1, left = 300
    for (let y = 0; y < 200; y++) for (let x = 0; x < 140; x++) {
      if (!out[y * 300 + x]) continue
      top = Math.min(top, y); bottom = Math.max(bottom, y); left = Math.min(left, x)
    }
    expect(bottom - top + 1).toBeGreaterThanOrEqual(12)
    expect(bottom - top + 1).toBeLessThanOrEqual(14)
    expect(left).toBeGreaterThanOrEqual(20 - 7)
  })

  it('makes a dot a disc of the asked width, unless it is a speck the speck filter will drop', async () => {
    const b = await svgToBitmap(svgDoc(100, 100, '<circle cx="50" cy="50" r="2.5"/>'))
    let area = 0
    for (const v of b.bitmap) area += v
    const out = thickenStrokes(b.bitmap, 100, 100, 16)
    expect(narrowestFeature(out, 100, 100, 10)!.widthPx).toBeGreaterThanOrEqual(16)
    const kept = thickenStrokes(b.bitmap, 100, 100, 16, { speckAreaPx: area })
    expect(Buffer.from(kept).equals(Buffer.from(b.bitmap))).toBe(true)
    expect(thickenStrokes(b.bitmap, 100, 100, 16, { speckAreaPx: area - 1 })).toEqual(out)
  })

  it('returns a copy and accepts no nonsense', () => {
    const bm = new Uint8Array(12)
    expect(thickenStrokes(bm, 4, 3, 5)).not.toBe(bm)
    expect(() => thickenStrokes(bm, 5, 3, 5)).toThrow(RangeError)
    expect(() => thickenStrokes(bm, 4, 3, Number.NaN)).toThrow(RangeError)
  })
})
