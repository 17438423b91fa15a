import { describe, expect, it } from 'vitest'
import { apply, homographyFromPoints, invert, multiply, rotation, warpBilinear, type Mat3, type Pt } from '../../../server/pipeline/homography'
import { mulberry32 } from './helpers'
import { python } from './python'

function randomQuad(rnd: () => number, size: number): Pt[] {
  // A convex quadrilateral: a rectangle's corners, each moved by up to a fifth of the size.
  const base = [{ x: 0, y: 0 }, { x: size, y: 0 }, { x: size, y: size * 0.7 }, { x: 0, y: size * 0.7 }]
  return base.map((p) => ({ x: p.x + (rnd() - 0.5) * 0.4 * size + size, y: p.y + (rnd() - 0.5) * 0.4 * size + size }))
}

describe('homography from four point pairs', () => {
  it('maps each point onto its partner, and its inverse maps back', () => {
    const rnd = mulberry32(21)
    for (let t = 0; t < 20; t++) {
      const from = randomQuad(rnd, 3000)
      const to = randomQuad(rnd, 800)
      const H = homographyFromPoints(from, to)
      for (let i = 0; i < 4; i++) {
        const p = apply(H, from[i]!)
        expect(Math.abs(p.x - to[i]!.x)).toBeLessThan(1e-6)
        expect(Math.abs(p.y - to[i]!.y)).toBeLessThan(1e-6)
      }
      const back = apply(invert(H), to[2]!)
      expect(Math.abs(back.x - from[2]!.x)).toBeLessThan(1e-6)
    }
    expect(() => homographyFromPoints([{ x: 0, y: 0 }, { x: 1, y: 1 }, { x: 2, y: 2 }, { x: 0, y: 5 }], randomQuad(rnd, 10))).toThrow(/degenerate/)
  })

  it('agrees with scikit-image\'s ProjectiveTransform on the same point pairs', () => {
    // Reference: skimage.transform.ProjectiveTransform.estimate (scikit-image, Debian package
    // python3-skimage), a least-squares DLT, exact for four pairs.
    const rnd = mulberry32(5)
    const cases = Array.from({ length: 12 }, () => ({ from: randomQuad(rnd, 4000), to: randomQuad(rnd, 2000) }))
    const script = `
import json, sys
import numpy as np
from skimage.transform import ProjectiveTransform
out = []
for c in json.load(sys.stdin):
    t = ProjectiveTransform()
    ok = t.estimate(np.array([[p['x'], p['y']] for p in c['from']]), np.array([[p['x'], p['y']] for p in c['to']]))
    m = t.params / t.params[2, 2]
    out.append(m.flatten().tolist())
print(json.dumps(out))`
    const theirs = JSON.parse(python(script, JSON.stringify(cases)).toString()) as Mat3[]
    for (let i = 0; i < cases.length; i++) {
      const ours = homographyFromPoints(cases[i]!.from, cases[i]!.to)
      // Same matrix (both scaled to h33 = 1), and the same image of points across the quad.
      for (let k = 0; k < 9; k++) expect(Math.abs(ours[k]! - theirs[i]![k]!)).toBeLessThanOrEqual(1e-7 * Math.max(1, Math.abs(theirs[i]![k]!)))
      for (let s = 0; s < 10; s++) {
        const p = { x: 1000 + rnd() * 4000, y: 1000 + rnd() * 3000 }
        const a = apply(ours, p), b = apply(theirs[i]!, p)
        expect(Math.hypot(a.x - b.x, a.y - b.y)).toBeLessThan(1e-6)
      }
    }
  })
})

describe('bilinear warp', () => {
  it('reproduces an image under the identity and a whole-pixel shift', () => {
    const rnd = mulberry32(9)
    const w = 13, h = 9
    const img = new Uint8Array(w * h).map(() => Math.floor(rnd() * 256))
    expect([...warpBilinear(img, w, h, 1, [1, 0, 0, 0, 1, 0, 0, 0, 1], w, h, [0])]).toEqual([...img])
    const shifted = warpBilinear(img, w, h, 1, [1, 0, 2, 0, 1, 1, 0, 0, 1], w, h, [7])
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) {
      const sx = x + 2, sy = y + 1
      expect(shifted[y * w + x]).toBe(sx < w && sy < h ? img[sy * w + sx] : 7)
    }
  })

  it('interpolates linearly between pixel centres (a linear ramp stays a ramp)', () => {
    const w = 64, h = 8
    const img = new Uint8Array(w * h)
    for (let y = 0; y < h; y++) for (let x = 0; x < w; x++) img[y * w + x] = 3 * x
    // output pixel centre u + ½ reads input x = (u + ½)/2 + 10, i.e. index (u + ½)/2 + 9.5
    const out = warpBilinear(img, w, h, 1, [0.5, 0, 10, 0, 1, 0, 0, 0, 1], 80, h, [0])
    for (let u = 0; u < 80; u++) expect(out[u]).toBe(Math.round(3 * ((u + 0.5) / 2 + 9.5)))
  })

  it('a quarter turn built from rotation() moves pixels as expected', () => {
    // rotation(90): (x, y) → (−y, x); with a shift it maps the w × h image onto h × w.
    const w = 5, h = 3
    const img = new Uint8Array(w * h).map((_, i) => i)
    const turn = multiply([1, 0, h, 0, 1, 0, 0, 0, 1], rotation(90)) // input → output
    const out = warpBilinear(img, w, h, 1, invert(turn), h, w, [255])
    // clockwise on screen: the top-left input pixel lands at the top-right
    expect(out[0 * h + (h - 1)]).toBe(img[0])
    expect(out[(w - 1) * h + (h - 1)]).toBe(img[w - 1])
  })
})
