import { describe, expect, it } from 'vitest'
import { formatNumber, formatWhen, plural } from '../../../app/utils/format'
import { formatAreaMm2, formatCutLength } from '../../../app/utils/artworks'
import { describeMeasurements, groupThousands } from '../../../app/utils/bench-warnings'
import type { Measurements } from '../../../shared/types/pipeline'

describe('one format for numbers, dates and counts', () => {
  it('groups thousands the same way on every page', () => {
    expect(formatNumber(1418.2, 0)).toBe('1,418')
    expect(formatAreaMm2(1415)).toBe('1,415 mm²')
    expect(groupThousands(1415)).toBe('1,415')
    expect(formatCutLength(24000)).toBe('24,000 mm (24 m)')
    expect(formatNumber(0.125, 2)).toBe('0.13')
  })

  it('writes a moment day first, on a 24-hour clock', () => {
    expect(formatWhen('2026-12-02T13:16:00Z', 'minute', 'UTC')).toBe('2 Dec 2026, 13:16')
    expect(formatWhen('2026-12-02T13:16:09Z', 'second', 'UTC')).toBe('2 Dec 2026, 13:16:09')
    expect(formatWhen('2026-12-02T13:16:00Z', 'date', 'UTC')).toBe('2 Dec 2026')
  })

  it('chooses the word by the plural rule of English (Unicode CLDR: "one" only for exactly 1)', () => {
    expect(plural(1, 'piece')).toBe('1 piece')
    expect(plural(0, 'piece')).toBe('0 pieces')
    expect(plural(2, 'copy', 'copies')).toBe('2 copies')
    expect(plural(1200, 'node')).toBe('1,200 nodes')
  })

  it('the bench and the compare view read out measurements in the same format', () => {
    const m = { widthMm: 80, heightMm: 50, inkAreaMm2: 1418.4, cutLengthMm: 2350.2, pieces: 3, holes: 1, nodes: 1200, narrowestFeatureMm: 1.2, smallPieces: 0, smallPieceLimitMm2: 1, fidelity: 0.98, threshold: 128 } as unknown as Measurements
    const lines = Object.fromEntries(describeMeasurements(m).map((l) => [l.key, l.value]))
    expect(lines.inkAreaMm2).toBe('1,418 mm²')
    expect(lines.cutLengthMm).toBe('2,350 mm')
    expect(lines.nodes).toBe('1,200')
  })
})
