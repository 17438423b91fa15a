// Pieces of ink against SciPy's connected-component labelling (scipy.ndimage.label with a 3 × 3
// structuring element, i.e. 8-connectivity; Debian's python3-scipy, installed with python3-skimage).
import { describe, expect, it } from 'vitest'
import { dropSmallPieces, findPieces, inkBox } from '../../../server/pipeline/components'
import { python } from './python'

function randomBitmap(width: number, height: number, density: number, seed: number): Uint8Array {
  const b = new Uint8Array(width * height)
  let s = seed
  for (let i = 0; i < b.length; i++) { s = (Math.imul(s, 1664525) + 1013904223) >>> 0; b[i] = s / 2 ** 32 < density ? 1 : 0 }
  return b
}

/** SciPy's labels for the bitmap, row-major, as 32-bit integers. */
function scipyLabels(b: Uint8Array, width: number, height: number): Int32Array {
  const out = python(`import sys, numpy as np; from scipy import ndimage
a = np.frombuffer(sys.stdin.buffer.read(), dtype=np.uint8).reshape(${height}, ${width})
lab, n = ndimage.label(a, structure=np.ones((3, 3), dtype=int))
sys.stdout.buffer.write(lab.astype('<i4').tobytes())`, Buffer.from(b))
  return new Int32Array(out.buffer, out.byteOffset, out.length / 4)
}

describe('findPieces', () => {
  it('finds the same pieces as SciPy, with their areas and boxes, on random bitmaps of every density', () => {
    const cases: Array<[number, number, number]> = [[1, 1, 1], [1, 40, 0.5], [37, 1, 0.5], [60, 45, 0.2], [61, 47, 0.45], [80, 33, 0.6], [50, 50, 0.9]]
    for (const [w, h, density] of cases) {
      const b = randomBitmap(w, h, density, w * 131 + h)
      const ours = findPieces(b, w, h)
      const theirs = scipyLabels(b, w, h)
      // the two labellings are the same partition: a one-to-one map between their numbers
      const map = new Map<number, number>(), back = new Map<number, number>()
      for (let i = 0; i < b.length; i++) {
        const a = ours.labels[i]!, t = theirs[i]!
        expect(a === 0).toBe(t === 0)
        if (!a) continue
        if (!map.has(a)) map.set(a, t)
        if (!back.has(t)) back.set(t, a)
        expect([map.get(a), back.get(t)]).toEqual([t, a])
      }
      expect(ours.pieces.length).toBe(new Set(theirs.filter((v) => v > 0)).size)
      // area and box of each piece, from SciPy's labels
      ours.pieces.forEach((p, k) => {
        const t = map.get(k + 1)!
        let area = 0, x0 = w, y0 = h, x1 = -1, y1 = -1
        for (let i = 0; i < b.length; i++) {
          if (theirs[i] !== t) continue
          const x = i % w, y = Math.floor(i / w)
          area++; x0 = Math.min(x0, x); x1 = Math.max(x1, x); y0 = Math.min(y0, y); y1 = Math.max(y1, y)
        }
        expect(p).toEqual({ area, x0, y0, x1, y1 })
      })
      // numbered in the order of each piece's first pixel in reading order
      let next = 1
      for (let i = 0; i < b.length; i++) if (ours.labels[i]! >= next) { expect(ours.labels[i]).toBe(next); next++ }
    }
  })

  it('joins pixels that touch only at a corner, keeps apart those a pixel away, and reads any non-zero byte as ink', () => {
    // X . . X
    // . X . .
    // . . . X
    const b = Uint8Array.from([255, 0, 0, 1, 0, 7, 0, 0, 0, 0, 0, 1])
    const found = findPieces(b, 4, 3)
    expect(found.pieces).toEqual([{ area: 2, x0: 0, y0: 0, x1: 1, y1: 1 }, { area: 1, x0: 3, y0: 0, x1: 3, y1: 0 }, { area: 1, x0: 3, y0: 2, x1: 3, y1: 2 }])
    expect(inkBox(found.pieces, 2)).toEqual({ x0: 0, y0: 0, x1: 1, y1: 1 })
    dropSmallPieces(b, found, 2)
    expect(Array.from(b)).toEqual([255, 0, 0, 0, 0, 7, 0, 0, 0, 0, 0, 0])
    expect(() => findPieces(b, 5, 3)).toThrow(RangeError)
  })
})
