// Which uploads become layered revisions: the clean-up's hard cases of one ink (paper tint,
// grid and ruled lines, pencil, uneven light, a photo at an angle) stay one colour; a drawing
// in several marker colours becomes layers, trimmed to the drawing's width.
import { describe, expect, it } from 'vitest'
import { readSvgRoot } from '../../../../server/cutsheet/path'
import { colourWork } from '../../../../server/pipeline/colour/tasks'
import { layeredUpload } from '../../../../server/pipeline/colour/upload'
import { runPipeline } from '../../../../server/pipeline/run'
import { gridBlue, gridGrey, inkOnEdges, marker, pencil, ruled, skewedWithShadow, unevenLight, type HardCase } from '../hard-cases'
import { photograph, threeInkDrawing } from './drawing'

async function decide(source: Uint8Array, widthMm: number) {
  const single = await runPipeline({ source, settings: {}, widthMm, purpose: 'revision' })
  return layeredUpload(colourWork, { source, settings: {}, widthMm, purpose: 'revision' }, single.choices)
}

describe('one ink stays one colour', () => {
  for (const make of [unevenLight, gridBlue, gridGrey, ruled, pencil, skewedWithShadow, inkOnEdges]) {
    it(make.name, async () => {
      const c: HardCase = await make()
      const d = await decide(c.source, c.widthMm)
      expect(d.kind, d.kind === 'layers' ? d.colour.sentence : '').toBe('single')
    }, 60_000)
  }
})

describe('several inks become layers', () => {
  it('coloured marker: yellow, red, green and blue', async () => {
    const c = await marker()
    const d = await decide(c.source, c.widthMm)
    if (d.kind !== 'layers') throw new Error(d.why)
    expect(d.result.layers.map((l) => l.name).sort()).toEqual(['blue', 'green', 'red', 'yellow'])
  }, 60_000)

  it('a three-ink photo: three layers, the drawing at the width asked', async () => {
    const { jpeg } = await photograph(threeInkDrawing())
    const d = await decide(jpeg, 120)
    if (d.kind !== 'layers') throw new Error(d.why)
    expect(d.result.layers.map((l) => l.name)).toEqual(['yellow', 'red', 'blue'])
    expect(d.colour.sentence).toMatch(/^3 inks found: yellow, red and blue/)
    // The drawing canvas (before the marks' frame) is the inks' width plus a little paper.
    const drawn = readSvgRoot(d.result.layers[0]!.drawnSvg).widthMm
    expect(drawn).toBeGreaterThan(120)
    expect(drawn).toBeLessThan(122)
  }, 60_000)
})
