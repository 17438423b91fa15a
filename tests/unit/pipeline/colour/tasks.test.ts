// The layered run as tasks: through a runner that copies every task and answer as a thread
// boundary does (structuredClone), the same files as in one thread; errors come back as kinds.
import { describe, expect, it } from 'vitest'
import { colourWork, ColourTaskError, runColourLayers, runColourLayersWith, type ColourTask } from '../../../../server/pipeline/colour/tasks'
import { photograph, threeInkDrawing } from './drawing'

describe('colour tasks', () => {
  it('give the same layers across a copying boundary as in one thread, the inks outlined side by side', async () => {
    const { jpeg } = await photograph(threeInkDrawing(900, 675))
    const req = { source: new Uint8Array(jpeg), settings: {}, widthMm: 90, purpose: 'revision' as const }
    const seen: string[] = []
    const copying = async (task: ColourTask) => { seen.push(task.kind); return structuredClone(await colourWork(structuredClone(task))) }
    const a = await runColourLayersWith(copying, req)
    const b = await runColourLayers(req)
    if (a.kind !== 'layers' || b.kind !== 'layers') throw new Error('expected layers')
    expect(seen).toEqual(['separate', 'outline', 'outline', 'outline', 'assemble'])
    expect(a.layers.map((l) => l.cleanSvg)).toEqual(b.layers.map((l) => l.cleanSvg))
    expect(a.stackedSvg).toBe(b.stackedSvg)
    expect(a.layers.map((l) => l.measurements)).toEqual(b.layers.map((l) => l.measurements))
  })

  it('answer a bad source or bad settings with a kind, and the runner throws it', async () => {
    const bad = await colourWork({ kind: 'separate', req: { source: new Uint8Array([0, 1, 2]), settings: {}, widthMm: 50, purpose: 'preview' } })
    expect(bad).toMatchObject({ ok: false, kind: 'prepare' })
    const { jpeg } = await photograph(threeInkDrawing(300, 225))
    const badCount = await colourWork({ kind: 'separate', req: { source: new Uint8Array(jpeg), settings: {}, widthMm: 50, purpose: 'preview', colour: { choices: { count: 9 } } } })
    expect(badCount).toMatchObject({ ok: false, kind: 'settings' })
    await expect(runColourLayersWith(colourWork, { source: new Uint8Array([0]), settings: {}, widthMm: 50, purpose: 'preview' })).rejects.toBeInstanceOf(ColourTaskError)
  })
})
