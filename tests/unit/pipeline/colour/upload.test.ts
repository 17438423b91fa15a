// Which uploads become layered revisions: the clean-up's hard cases of one ink (paper tint,
// grid and ruled lines, pencil, uneven light, a photo at an angle) stay one colour; a drawing
// in several marker colours becomes layers, trimmed to the drawing's width.
import { describe, expect, it } from 'vitest'
import { readSvgRoot } from '../../../../server/cutsheet/path'
import { colourWork } from '../../../../server/pipeline/colour/tasks'
import { followLook, layeredUpload, layersAsAsked } from '../../../../server/pipeline/colour/upload'
import { srgbToLab } from '../../../../server/pipeline/colour/lab'
import type { SeparatedSource } from '../../../../server/pipeline/colour/run-layers'
import { colourSettingsSchema } from '../../../../shared/utils/colour-settings'
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

describe('layers as the designer set them on the bench', () => {
  const asked = (o: object) => colourSettingsSchema.parse(o)
  const req = async (purpose: 'preview' | 'revision') => ({ source: (await photograph(threeInkDrawing())).jpeg, settings: {}, widthMm: 120, purpose })

  it('drops an ink (the yellow, found first), turns the stack over and cuts one layer out under the other', async () => {
    const d = await layersAsAsked(colourWork, await req('revision'), asked({ drop: [0], order: [1, 0], stack: [{ mode: 'knock-out', overlapMm: 0 }], marks: false }))
    if (d.kind !== 'layers') throw new Error(d.why)
    expect(d.result.layers.map((l) => l.name)).toEqual(['blue', 'red'])
    expect(d.colour.stack).toEqual([{ mode: 'knock-out', overlapMm: 0 }, { mode: 'under', overlapMm: 0.5 }])
    expect(d.colour.marks).toBe(false)
    expect(d.result.frame.marks).toEqual([])
    expect(d.colour.asked?.drop).toEqual([0])
    expect(d.colour.sentence).toMatch(/^2 inks found \(\d dropped\): red and blue/)
  }, 60_000)

  it('previews at screen resolution, trimmed to the inks at the width asked', async () => {
    const d = await layersAsAsked(colourWork, await req('preview'), asked({}))
    if (d.kind !== 'layers') throw new Error(d.why)
    expect(d.result.layers).toHaveLength(3)
    expect(d.result.pxPerMm).toBeLessThan(7)
    const drawn = readSvgRoot(d.result.layers[0]!.drawnSvg).widthMm
    expect(drawn).toBeGreaterThan(120)
    expect(drawn).toBeLessThan(125)
  }, 60_000)

  it('is one colour when asked for one ink', async () => {
    expect((await layersAsAsked(colourWork, await req('revision'), asked({ count: 1 }))).kind).toBe('single')
  })
})

describe('the full separation follows the first look', () => {
  const sep = (rgbs: Array<[number, number, number]>) => ({ inks: rgbs.map((c) => ({ lab: srgbToLab(...c) })) }) as unknown as SeparatedSource
  it('a blend near an ink of the look joins it; an ink the look did not see keeps its own group; a left-out ink stays out', () => {
    const look = sep([[247, 212, 23], [216, 38, 46], [29, 79, 184], [200, 200, 200]])
    const full = sep([[247, 212, 23], [232, 96, 110], [216, 38, 46], [29, 79, 184], [40, 160, 60], [198, 198, 198]])
    // The look kept yellow, red and blue (grey was left out); the full separation's own groups, one ink each.
    expect(followLook(full, look, [[0], [1], [2]], [[0], [1], [2], [3], [4], [5]])).toEqual([[0], [1, 2], [3], [4]])
  })
})
