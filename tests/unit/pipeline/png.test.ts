// The 1-bit PNG writer, read back by two independent decoders: libvips (sharp, libspng) and
// scikit-image's imread (Debian's python3-skimage, through imageio/Pillow).
import { writeFileSync, mkdtempSync, rmSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { bilevelPng } from '../../../server/pipeline/png'
import { python } from './python'

function randomBitmap(width: number, height: number, seed: number): Uint8Array {
  const b = new Uint8Array(width * height)
  let s = seed
  for (let i = 0; i < b.length; i++) { s = (Math.imul(s, 1664525) + 1013904223) >>> 0; b[i] = s >>> 31 }
  return b
}

const SIZES: Array<[number, number]> = [[1, 1], [7, 3], [8, 2], [9, 5], [17, 11], [333, 41]]

describe('bilevelPng', () => {
  it('gives the same pixels back through libvips, as a 1-bit 2-colour palette PNG', async () => {
    for (const [w, h] of SIZES) {
      const bm = randomBitmap(w, h, w * 31 + h)
      const png = bilevelPng(bm, w, h)
      const meta = await sharp(png).metadata()
      expect([meta.format, meta.width, meta.height, meta.isPalette, meta.bitsPerSample]).toEqual(['png', w, h, true, 1])
      const { data, info } = await sharp(png).greyscale().raw().toBuffer({ resolveWithObject: true })
      for (let i = 0; i < bm.length; i++) expect(data[i * info.channels]).toBe(bm[i] ? 0 : 255)
    }
  })

  it('gives the same pixels back through scikit-image (Pillow), black ink on white', () => {
    const dir = mkdtempSync(path.join(os.tmpdir(), 'dw-png-'))
    try {
      for (const [w, h] of SIZES) {
        const bm = randomBitmap(w, h, w + h * 7)
        const file = path.join(dir, `${w}x${h}.png`)
        writeFileSync(file, bilevelPng(bm, w, h, 1))
        // RGB values, row-major, one byte per channel
        const out = python(`import sys, numpy as np; from skimage import io; a = io.imread(${JSON.stringify(file)}); a = a if a.ndim == 3 else np.stack([a] * 3, -1); sys.stdout.buffer.write(np.ascontiguousarray(a[..., :3]).astype(np.uint8).tobytes())`)
        expect(out.length).toBe(w * h * 3)
        for (let i = 0; i < bm.length; i++) {
          const v = bm[i] ? 0 : 255
          expect([out[3 * i], out[3 * i + 1], out[3 * i + 2]]).toEqual([v, v, v])
        }
      }
    } finally {
      rmSync(dir, { recursive: true, force: true })
    }
  })

  it('reads any non-zero byte as ink, and gives the same bytes for the same input', async () => {
    const bm = randomBitmap(21, 13, 5)
    const wide = bm.map((v, i) => (v ? 1 + (i % 255) : 0))
    expect(bilevelPng(wide, 21, 13)).toEqual(bilevelPng(bm, 21, 13))
    expect(bilevelPng(bm, 21, 13, 6)).toEqual(bilevelPng(bm, 21, 13, 6))
    expect(() => bilevelPng(bm, 20, 13)).toThrow(RangeError)
  })
})
