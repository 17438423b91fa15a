import { svgPathProperties } from 'svg-path-properties'
import { describe, expect, it } from 'vitest'
import {
  cubicFlatness, flattenCubic, flattenCurve, polygonPerimeter, readCleanVector, readSvgRoot, type CubicSegment, type CutCurve,
} from '../../../server/cutsheet/path'
import { cleanVector } from '../../../server/pipeline/clean'
import { curveLength, curveSignedArea } from '../../../server/pipeline/geometry'
import { mulberry32 } from '../pipeline/helpers'
import {
  closedLength, discCurve, discPathData, distToSegment, rectCurve, rectPathData, sampleCubic, svgMm,
} from './shapes'

const totalLength = (curves: CutCurve[]) => curves.reduce((s, c) => s + curveLength(c), 0)

describe('readCleanVector', () => {
  it('reads our svgo-written clean vector back to the same geometry (rect, disc, ring)', () => {
    // Shapes in prepared-bitmap pixels at 10 px/mm on an 80 × 60 mm box: a 20 × 10 mm bar,
    // a disc r = 12 mm, a ring R = 15 mm / r = 8 mm.
    const pxPerMm = 10
    const curves = [
      rectCurve(50, 50, 200, 100),
      discCurve(400, 200, 120, 1),
      discCurve(600, 400, 150, 1),
      discCurve(600, 400, 80, -1),
    ]
    const clean = cleanVector({ curves, width: 800, height: 600, pxPerMm })
    // svgo has rewritten the path in relative commands; the reader must undo that.
    expect(clean.svg).toMatch(/[a-z]/)
    const read = readCleanVector(clean.svg)
    expect(read.widthMm).toBe(80)
    expect(read.heightMm).toBe(60)
    expect(read.curves).toHaveLength(4)
    read.curves.forEach((c, i) => {
      const want = clean.curvesMm[i]!
      // Same closed curve: same length and enclosed area (svgo may merge or re-express segments),
      // to within the 0.001 precision svgo keeps.
      expect(curveLength(c)).toBeCloseTo(curveLength(want), 2)
      expect(curveSignedArea(c)).toBeCloseTo(curveSignedArea(want), 1)
      const first = c.segments[0]!.from, last = c.segments[c.segments.length - 1]!.to
      expect(last).toEqual(first)
    })
    // Second opinion on the cut length: svg-path-properties (npm, a general-purpose SVG path
    // length library) on the svgo path data, which is in mm because the viewBox is.
    const d = /<path[^>]* d="([^"]+)"/.exec(clean.svg)![1]!
    expect(Math.abs(new svgPathProperties(d).getTotalLength() / totalLength(read.curves) - 1)).toBeLessThan(1e-4)
  })

  it('reads every command letter, relative and absolute alike (SVG 1.1 §8.3 path data)', () => {
    // Worked by hand from (10,10): h20 → (30,10); v10 → (30,20); l-5 5 → (25,25);
    // c0 5 -5 10 -10 10 → C25 30 20 35 15 35; s-10 -5 -10 -10 → first control reflected
    // 2·(15,35) − (20,35) = (10,35), so C10 35 5 30 5 25; q0 -10 5 -12 → Q5 15 10 13;
    // t5 -8 → control reflected 2·(10,13) − (5,15) = (15,11), end (15,5); z.
    // Second line: implicit lineto after l, and m after z relative to the subpath's start
    // (SVG 1.1 §8.3.3): (40,40) + (20,0) = (60,40).
    const rel = 'm10 10h20v10l-5 5c0 5-5 10-10 10s-10-5-10-10q0-10 5-12t5-8z'
      + 'M40 40l10 0 0 10-10 0zm20 0h5v5h-5z'
    const abs = 'M10 10H30V20L25 25C25 30 20 35 15 35S5 30 5 25Q5 15 10 13T15 5Z'
      + 'M40 40L50 40L50 50L40 50ZM60 40H65V45H60Z'
    const a = readCleanVector(svgMm(100, 100, [rel]))
    const b = readCleanVector(svgMm(100, 100, [abs]))
    expect(a.curves).toHaveLength(3)
    expect(a.curves.map((c) => c.segments.length)).toEqual(b.curves.map((c) => c.segments.length))
    a.curves.forEach((c, i) => c.segments.forEach((s, j) => {
      const t = b.curves[i]!.segments[j]!
      expect(s.kind).toBe(t.kind)
      expect(s.to.x).toBeCloseTo(t.to.x, 9)
      expect(s.to.y).toBeCloseTo(t.to.y, 9)
      if (s.kind === 'cubic' && t.kind === 'cubic') {
        for (const k of ['c1', 'c2'] as const) { expect(s[k].x).toBeCloseTo(t[k].x, 9); expect(s[k].y).toBeCloseTo(t[k].y, 9) }
      }
    }))
    // Quadratics are raised to cubics exactly: C1 = P0 + 2/3 (Q − P0) for Q5 15 from (5,25).
    const q = a.curves[0]!.segments[5]! as CubicSegment // h v l c s q t z: the sixth
    expect(q.c1.y).toBeCloseTo(25 + (2 / 3) * (15 - 25), 12)
    // svg-path-properties (npm) measures both spellings the same, and as we do.
    for (const d of [rel, abs]) expect(new svgPathProperties(d).getTotalLength()).toBeCloseTo(totalLength(a.curves), 3)
  })

  it('closes an unclosed subpath with a straight line, as SVG fills it (SVG 1.1 §8.3.3)', () => {
    const r = readCleanVector(svgMm(50, 50, ['M0 0H10V10']))
    expect(r.curves[0]!.segments).toHaveLength(3)
    expect(totalLength(r.curves)).toBeCloseTo(20 + Math.SQRT2 * 10, 12)
  })

  it('converts width and height with CSS absolute units (CSS Values and Units 3 §5.2: 1in = 2.54cm = 96px)', () => {
    expect(readSvgRoot('<svg width="4cm" height="2cm" viewBox="0 0 40 20">').widthMm).toBe(40)
    const px = readSvgRoot('<svg width="96px" height="192" viewBox="0 0 96 192">')
    expect(px.widthMm).toBeCloseTo(25.4, 12)
    expect(px.heightMm).toBeCloseTo(50.8, 12)
    expect(px.mmPerUnit).toBeCloseTo(25.4 / 96, 12)
    // 1pt = 1/72 in, 1pc = 1/6 in (same source)
    expect(readSvgRoot('<svg width="72pt" height="6pc" viewBox="0 0 1 1">').heightMm).toBeCloseTo(25.4, 12)
    // viewBox in another unit: a 2in wide document with a 0…100 viewBox has 0.508 mm per unit
    // (SVG 1.1 §7.7: the viewBox is stretched onto width × height).
    const r = readCleanVector('<svg width="2in" height="1in" viewBox="0 0 100 50"><path d="M0 0H100V50H0Z"/></svg>')
    expect(totalLength(r.curves)).toBeCloseTo(2 * (50.8 + 25.4), 9)
  })

  it('refuses what it would misread', () => {
    expect(() => readCleanVector('<svg width="10mm" height="10mm" viewBox="0 0 10 10"><g transform="scale(2)"><path d="M0 0H1V1Z"/></g></svg>')).toThrow(/Transforms/)
    expect(() => readCleanVector('<svg width="10mm" height="10mm" viewBox="0 0 10 10"><rect width="5" height="5"/></svg>')).toThrow(/<rect>/)
    expect(() => readCleanVector(svgMm(10, 10, ['M0 0A5 5 0 0 1 10 0Z']))).toThrow(/arcs/i)
    expect(() => readCleanVector('<svg width="10mm" height="20mm" viewBox="0 0 10 10"><path d="M0 0H1V1Z"/></svg>')).toThrow(/aspect/)
    expect(() => readCleanVector('<svg width="10%" height="10mm" viewBox="0 0 10 10"></svg>')).toThrow(/absolute length/)
    expect(() => readCleanVector('<div/>')).toThrow(/No <svg>/)
  })
})

describe('flattening within a chord tolerance', () => {
  const rnd = mulberry32(11)
  const randomCubic = (size: number): CubicSegment => {
    const p = () => ({ x: rnd() * size, y: rnd() * size })
    return { kind: 'cubic', from: p(), c1: p(), c2: p(), to: p() }
  }

  it('the flatness bound is never below the true distance from the chord (fine sampling)', () => {
    for (let k = 0; k < 50; k++) {
      const s = randomCubic(40)
      let worst = 0
      for (const q of sampleCubic(s, 2000)) worst = Math.max(worst, distToSegment(q, s.from, s.to))
      expect(cubicFlatness(s)).toBeGreaterThanOrEqual(worst - 1e-12)
    }
  })

  it.each([0.05, 0.01, 0.2])('every point of the cubic is within %s mm of the polyline, and back (fine sampling)', (tol) => {
    for (let k = 0; k < 12; k++) {
      const s = randomCubic(60)
      const poly = flattenCubic(s, tol)
      expect(poly[0]).toEqual(s.from)
      expect(poly[poly.length - 1]).toEqual(s.to)
      const dense = sampleCubic(s, 2000)
      // curve → polyline
      let worst = 0
      for (const q of dense) {
        let d = Infinity
        for (let i = 0; i + 1 < poly.length; i++) d = Math.min(d, distToSegment(q, poly[i]!, poly[i + 1]!))
        worst = Math.max(worst, d)
      }
      expect(worst).toBeLessThanOrEqual(tol + 1e-9)
      // polyline → curve: points along each chord, to the nearest dense sample; the samples are
      // at most `step` apart, so a true distance ≤ tol shows as ≤ tol + step / 2.
      let step = 0
      for (let i = 1; i < dense.length; i++) step = Math.max(step, Math.hypot(dense[i]!.x - dense[i - 1]!.x, dense[i]!.y - dense[i - 1]!.y))
      let back = 0
      for (let i = 0; i + 1 < poly.length; i++) {
        for (let j = 0; j <= 8; j++) {
          const t = j / 8
          const q = { x: poly[i]!.x + t * (poly[i + 1]!.x - poly[i]!.x), y: poly[i]!.y + t * (poly[i + 1]!.y - poly[i]!.y) }
          let d = Infinity
          for (const r of dense) d = Math.min(d, Math.hypot(q.x - r.x, q.y - r.y))
          back = Math.max(back, d)
        }
      }
      expect(back).toBeLessThanOrEqual(tol + step / 2 + 1e-9)
    }
  })

  it('a disc r = 25 mm flattened within 0.05 mm: on the circle, perimeter within 0.1 % of 2πr (handbook geometry)', () => {
    const r = 25, cx = 30, cy = 30
    const [curve] = readCleanVector(svgMm(60, 60, [discPathData(cx, cy, r)])).curves
    const poly = flattenCurve(curve!)
    // How far the four cubics themselves stray from the circle (the quarter-circle cubic with
    // k = 4/3·tan(π/8) is off by about 2.7e-4·r at most — from memory; measured here by
    // sampling, plus the 0.01 mm rounding of the control points).
    let cubicError = 0
    for (const s of curve!.segments) for (const q of sampleCubic(s as CubicSegment, 2000)) cubicError = Math.max(cubicError, Math.abs(Math.hypot(q.x - cx, q.y - cy) - r))
    expect(cubicError).toBeLessThan(3e-4 * r + 0.0071)
    // Vertices are points of the curve, so within cubicError of the circle ( ≤ 0.05 + rounding).
    for (const v of poly) expect(Math.abs(Math.hypot(v.x - cx, v.y - cy) - r)).toBeLessThanOrEqual(cubicError + 1e-9)
    // Every point of every chord within 0.05 mm of the curve, hence of the circle + cubicError.
    for (let i = 0; i < poly.length; i++) {
      const a = poly[i]!, b = poly[(i + 1) % poly.length]!
      for (let j = 0; j <= 10; j++) {
        const t = j / 10
        const d = Math.hypot(a.x + t * (b.x - a.x) - cx, a.y + t * (b.y - a.y) - cy)
        expect(Math.abs(d - r)).toBeLessThanOrEqual(0.05 + cubicError + 1e-9)
      }
    }
    // Circumference 2πr (handbook geometry).
    const perimeter = polygonPerimeter(poly)
    expect(perimeter).toBeCloseTo(closedLength(poly), 12)
    expect(Math.abs(perimeter / (2 * Math.PI * r) - 1)).toBeLessThan(0.001)
    // Not wasteful: a chord of sagitta 0.05 on r = 25 spans 2·acos(1 − 0.05/25) ≈ 0.126 rad, so
    // at least 50 chords are needed; halving keeps it within a small multiple of that.
    expect(poly.length).toBeGreaterThanOrEqual(50)
    expect(poly.length).toBeLessThanOrEqual(200)
  })

  it('lines stay as they are; a rectangle is its four corners', () => {
    const [c] = readCleanVector(svgMm(50, 50, [rectPathData(5, 5, 20, 10)])).curves
    expect(flattenCurve(c!)).toEqual([{ x: 5, y: 5 }, { x: 25, y: 5 }, { x: 25, y: 15 }, { x: 5, y: 15 }])
  })

  it('refuses a tolerance that is not a positive number', () => {
    const s = randomCubic(10)
    expect(() => flattenCubic(s, 0)).toThrow(RangeError)
    expect(() => flattenCubic(s, Number.NaN)).toThrow(RangeError)
  })
})
