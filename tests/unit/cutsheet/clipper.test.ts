// The offset's round joins, measured: every vertex on the true arc, every chord within
// ARC_CHORD_FACTOR × the arc tolerance of it (handbook geometry: the points within d of a
// convex polygon are bounded by its edges moved out by d and circular arcs of radius d about
// its vertices).
import { describe, expect, it } from 'vitest'
import { ARC_CHORD_FACTOR, grownOutline, offsetRegion } from '../../../server/cutsheet/clipper'
import type { Point } from '../../../server/cutsheet/path'
import { distToSegment } from './shapes'

function distanceToPolygon(p: Point, poly: Point[]): number {
  let d = Infinity
  for (let i = 0; i < poly.length; i++) d = Math.min(d, distToSegment(p, poly[i]!, poly[(i + 1) % poly.length]!))
  return d
}

function worst(offset: Point[], poly: Point[], delta: number) {
  let vertex = 0, chord = 0
  for (let i = 0; i < offset.length; i++) {
    const a = offset[i]!, b = offset[(i + 1) % offset.length]!
    vertex = Math.max(vertex, Math.abs(distanceToPolygon(a, poly) - delta))
    for (let k = 1; k < 8; k++) {
      const q = { x: a.x + (b.x - a.x) * k / 8, y: a.y + (b.y - a.y) * k / 8 }
      chord = Math.max(chord, delta - distanceToPolygon(q, poly))
    }
  }
  return { vertex, chord }
}

describe('offsets through clipper-lib', () => {
  // A regular 60-gon (6° turns, the kind of small turn a flattened curve makes) and a square.
  const ngon: Point[] = Array.from({ length: 60 }, (_, i) => ({ x: 50 + 20 * Math.cos(i * Math.PI / 30), y: 50 + 20 * Math.sin(i * Math.PI / 30) }))
  const square: Point[] = [{ x: 0, y: 0 }, { x: 10, y: 0 }, { x: 10, y: 10 }, { x: 0, y: 10 }]

  it.each([[0.01, 1.5], [0.005, 0.1], [0.02, 3]])('tolerance %s mm at offset %s mm: vertices on the arc, chords within the stated factor', (tol, delta) => {
    for (const poly of [ngon, square]) {
      const [out] = offsetRegion([poly], delta, tol)
      const w = worst(out!, poly, delta)
      expect(w.vertex).toBeLessThanOrEqual(2e-4) // 0.1 µm integer grid
      expect(w.chord).toBeLessThanOrEqual(ARC_CHORD_FACTOR * tol + 2e-4)
    }
  })

  it('the chord factor is needed: some chord strays more than the tolerance itself', () => {
    // At offset 1.5 and tolerance 0.01 a step is 2·acos(1 − 0.01 / 1.5) = 0.231 rad. A regular
    // 19-gon turns 2π / 19 = 0.331 rad = 1.43 steps at each vertex, which Clipper rounds to one
    // chord: sagitta 1.5 · (1 − cos(0.331 / 2)) = 0.0204 mm, about twice the tolerance.
    const gon19: Point[] = Array.from({ length: 19 }, (_, i) => ({ x: 20 * Math.cos(i * 2 * Math.PI / 19), y: 20 * Math.sin(i * 2 * Math.PI / 19) }))
    const [out] = offsetRegion([gon19], 1.5, 0.01)
    const w = worst(out!, gon19, 1.5)
    expect(w.chord).toBeGreaterThan(0.02)
    expect(w.chord).toBeLessThanOrEqual(ARC_CHORD_FACTOR * 0.01)
  })

  it('a grown outline fills holes: a ring grown by 1 mm is one disc-like outline', () => {
    const hole = ngon.map((p) => ({ x: 50 + (p.x - 50) / 2, y: 50 + (p.y - 50) / 2 })).reverse()
    expect(offsetRegion([ngon, hole], 1, 0.01)).toHaveLength(2)
    const grown = grownOutline([ngon, hole], 1, 0.01)
    expect(grown).toHaveLength(1)
  })
})
