import { describe, expect, it } from 'vitest'
import { packCurves, unpackCurves } from '../../../server/cutsheet/curve-buffer'
import type { CutCurve } from '../../../server/cutsheet/path'

const curves: CutCurve[] = [
  { segments: [
    { kind: 'line', from: { x: 0, y: 0 }, to: { x: 20.25, y: 0 } },
    { kind: 'cubic', from: { x: 20.25, y: 0 }, c1: { x: 25, y: 5 }, c2: { x: 25, y: 15 }, to: { x: 20.25, y: 20 } },
    { kind: 'line', from: { x: 20.25, y: 20 }, to: { x: 0, y: 0 } },
  ] },
  { segments: [{ kind: 'line', from: { x: 1e-9, y: -3.5 }, to: { x: 1e-9, y: -3.5 } }] },
]

describe('packCurves / unpackCurves', () => {
  it('give back exactly the curves the structured clone would (the copy they replace)', () => {
    const packed = packCurves(curves)
    // 1 count + per curve 1 count + 5 per line, 9 per cubic.
    expect(packed.length).toBe(1 + (1 + 5 + 9 + 5) + (1 + 5))
    expect(unpackCurves(packed)).toEqual(structuredClone(curves))
    expect(unpackCurves(packCurves([]))).toEqual([])
  })

  it('refuse a buffer that is cut short, has data left over, or names an unknown segment', () => {
    const packed = packCurves(curves)
    expect(() => unpackCurves(packed.subarray(0, packed.length - 1))).toThrow(/end early/)
    expect(() => unpackCurves(Float64Array.from([...packed, 0]))).toThrow(/left over/)
    const bad = Float64Array.from(packed)
    bad[2] = 7
    expect(() => unpackCurves(bad)).toThrow(/Unknown segment kind 7/)
  })
})
