// One name per measure and action: the pages take their words from shared/glossary.ts, and
// none spells a measure another way.
import { readFileSync, readdirSync } from 'node:fs'
import path from 'node:path'
import { describe, expect, it } from 'vitest'
import { ACTION, MEASURE, smallPiecesUnder } from '../../../shared/glossary'
import { describeMeasurements } from '../../../app/utils/bench-warnings'
import type { Measurements } from '../../../shared/types/pipeline'

// Second names each measure or action once had somewhere in the app.
const OTHER_NAMES = [/narrowest feature/i, /(?<!small )pieces under/i, /\bmake revision\b/i, /initial cut/i, /make a new revision/i]

function sources(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => {
    const p = path.join(dir, e.name)
    return e.isDirectory() ? sources(p) : /\.(vue|ts)$/.test(e.name) ? [p] : []
  })
}

describe('the glossary', () => {
  it('gives each measure and action one distinct name', () => {
    const names = [...Object.values(MEASURE), ...Object.values(ACTION)]
    expect(new Set(names).size).toBe(names.length)
    expect(smallPiecesUnder('1 mm²')).toBe('Small pieces under 1 mm²')
  })

  it('is where the bench and the compare view take their measure names from', () => {
    const m = { widthMm: 80, heightMm: 50, inkAreaMm2: 1418, cutLengthMm: 2350, pieces: 3, holes: 1, nodes: 1200, narrowestFeatureMm: 1.2, smallPieces: 0, smallPieceLimitMm2: 1, fidelity: 0.98, threshold: 128 } as unknown as Measurements
    const labels = describeMeasurements(m).map((l) => l.label)
    expect(labels).toContain(MEASURE.narrowest)
    expect(labels).toContain(smallPiecesUnder('1 mm²'))
  })

  it('leaves no page with a second name for a measure or an action', () => {
    const found: string[] = []
    for (const file of sources(path.resolve('app'))) {
      const text = readFileSync(file, 'utf8')
      for (const re of OTHER_NAMES) if (re.test(text)) found.push(`${path.relative(process.cwd(), file)}: ${re}`)
    }
    expect(found).toEqual([])
  })
})
