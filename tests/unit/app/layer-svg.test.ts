// The stacked vector taken apart for drawing, on the preview module's own output.
import { describe, expect, it } from 'vitest'
import { layersToDraw, listInWords, readStackedSvg, stackPlace } from '../../../app/utils/layer-svg'
import { stackedPreviewSvg } from '../../../server/pipeline/colour/preview'

const layer = (d: string) => `<svg xmlns="http://www.w3.org/2000/svg" width="40mm" height="20mm" viewBox="0 0 40 20"><path d="${d}"/></svg>`

describe('the stacked vector for drawing', () => {
  const svg = stackedPreviewSvg([
    { svg: layer('M1 1h10v10h-10z'), hex: '#F7D417' },
    { svg: layer('M5 5h10v10h-10z'), hex: '#d8262e' },
    { svg: layer('M20 2h5v5h-5z'), hex: '#1d4fb8' },
  ])

  it('reads the size, the viewBox and one group per layer, bottom first', () => {
    const d = readStackedSvg(svg)!
    expect(d).toMatchObject({ viewBox: '0 0 40 20', widthMm: 40, heightMm: 20 })
    expect(d.groups).toHaveLength(3)
    expect(d.groups[0]).toContain('fill="#f7d417"')
    expect(d.groups[2]).toContain('M20 2h5v5h-5z')
  })

  it('draws all layers, or one alone', () => {
    const d = readStackedSvg(svg)!
    expect(layersToDraw(d, null)).toBe(d.groups.join(''))
    expect(layersToDraw(d, 1)).toBe(d.groups[1])
    expect(layersToDraw(d, 1)).not.toContain('#1d4fb8')
  })

  it('is null for a one-colour vector', () => {
    expect(readStackedSvg(layer('M0 0h1v1z'))).toBeNull()
  })

  it('names places in the stack in words', () => {
    expect([0, 1, 2].map((i) => stackPlace(i, 3))).toEqual(['bottom', 'middle', 'top'])
    expect(stackPlace(1, 4)).toBe('second from the bottom')
  })

  it('lists inks in words', () => {
    expect(listInWords(['red'])).toBe('red')
    expect(listInWords(['red', 'blue'])).toBe('red and blue')
    expect(listInWords(['yellow', 'red', 'blue'])).toBe('yellow, red and blue')
  })
})
