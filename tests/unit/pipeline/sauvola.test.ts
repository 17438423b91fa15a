import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { reflectIndex, sauvolaBitmap, sauvolaThresholds, windowPx } from '../../../server/pipeline/sauvola'
import { gaussian, mulberry32 } from './helpers'
import { python } from './python'

/** A grey page: shading, a faint pencil-like curve, a dark block, noise. */
async function page(w: number, h: number): Promise<Uint8Array> {
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="${w}" height="${h}">
    <defs><linearGradient id="g"><stop offset="0" stop-color="#eee"/><stop offset="1" stop-color="#777"/></linearGradient></defs>
    <rect width="100%" height="100%" fill="url(#g)"/>
    <path d="M10 ${h * 0.7} C ${w * 0.3} 0, ${w * 0.6} ${h}, ${w - 10} ${h * 0.3}" stroke="#000" stroke-opacity="0.25" stroke-width="3" fill="none"/>
    <rect x="${w * 0.2}" y="${h * 0.2}" width="${w * 0.2}" height="${h * 0.3}" fill="#222"/></svg>`
  const { data } = await sharp(Buffer.from(svg)).greyscale().raw().toBuffer({ resolveWithObject: true })
  const rnd = mulberry32(4)
  return Uint8Array.from(data, (v) => Math.max(0, Math.min(255, Math.round(v + 4 * gaussian(rnd)))))
}

describe('Sauvola adaptive threshold', () => {
  it('mirrors indices about the edge pixels', () => {
    expect([-3, -2, -1, 0, 1, 2, 3, 4, 5].map((i) => reflectIndex(i, 3))).toEqual([1, 2, 1, 0, 1, 2, 1, 0, 1])
    expect(reflectIndex(-5, 1)).toBe(0)
  })

  it('agrees with scikit-image\'s threshold_sauvola on the same image', async () => {
    // Reference: skimage.filters.threshold_sauvola (scikit-image, Debian python3-skimage), which
    // implements Sauvola & Pietikäinen, Pattern Recognition 33 (2000) 225–236, with integral
    // images and mirrored borders; R defaults to half the 8-bit range.
    const w = 173, h = 121
    const grey = await page(w, h)
    for (const [window, k] of [[15, 0.2], [31, 0.34], [5, 0.1], [151, 0.2]] as const) {
      const script = `
import sys, numpy as np
from skimage.filters import threshold_sauvola
img = np.frombuffer(sys.stdin.buffer.read(), dtype=np.uint8).reshape(${h}, ${w})
t = threshold_sauvola(img, window_size=${window}, k=${k})
sys.stdout.buffer.write(t.astype(np.float64).tobytes())`
      const out = python(script, Buffer.from(grey))
      const theirs = new Float64Array(out.buffer, out.byteOffset, out.byteLength / 8)
      const ours = sauvolaThresholds(grey, w, h, { window, k })
      let worst = 0
      for (let i = 0; i < ours.length; i++) worst = Math.max(worst, Math.abs(ours[i]! - theirs[i]!))
      expect(worst).toBeLessThan(1e-6)
      // and the bitmap is exactly "grey ≤ T" (skimage calls pixels above T foreground, i.e. paper here)
      const bm = sauvolaBitmap(grey, w, h, { window, k })
      let differ = 0
      for (let i = 0; i < bm.length; i++) if (bm[i] !== (grey[i]! > theirs[i]! ? 0 : 1)) differ++
      expect(differ).toBe(0)
    }
  })

  it('keeps faint strokes on shaded paper that one global level cannot', async () => {
    const w = 300, h = 200
    const grey = await page(w, h)
    const bm = sauvolaBitmap(grey, w, h, { window: 31 })
    // the faint curve crosses the darkest, right-hand side of the page around x = 280
    let found = false
    for (let y = 0; y < h; y++) if (bm[y * w + 280]) found = true
    expect(found).toBe(true)
    // and the bare paper on that side stays paper
    let specks = 0
    for (let y = 150; y < 190; y++) for (let x = 240; x < 290; x++) specks += bm[y * w + x]!
    expect(specks).toBeLessThan(20)
  })

  it('window in mm at the decal\'s resolution: odd pixels, at least 3', () => {
    expect(windowPx(8, 10)).toBe(81)
    expect(windowPx(8, 11.5)).toBe(93)
    expect(windowPx(0.1, 5)).toBe(3)
  })
})
