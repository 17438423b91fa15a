// Films suggested by colour, against Debian's scikit-image (skimage.color.rgb2lab with the D65
// white and skimage.color.deltaE_ciede2000, CIE 142-2001) ranking the same swatches.
import { execFileSync } from 'node:child_process'
import { existsSync } from 'node:fs'
import { describe, expect, it } from 'vitest'
import { filmsByColour, type FilmSwatch } from '../../../../server/robots/film-colours'

const PYTHON = '/usr/bin/python3'

/** The films' ids nearest the ink first, by scikit-image. */
function skimageRanking(ink: string, films: FilmSwatch[]): number[] {
  if (!existsSync(PYTHON)) throw new Error(`${PYTHON} is missing: install Debian's python3-skimage (apt-get install python3-skimage).`)
  const script = `
import json, sys
try:
    import numpy as np
    from skimage.color import rgb2lab, deltaE_ciede2000
except ImportError:
    sys.exit("scikit-image is missing: install Debian's python3-skimage (apt-get install python3-skimage)")
ink, films = json.loads(sys.argv[1]), json.loads(sys.argv[2])
def lab(h): return rgb2lab(np.array([[[int(h[i:i + 2], 16) / 255 for i in (1, 3, 5)]]]), illuminant='D65')[0][0]
d = [(float(deltaE_ciede2000(lab(ink), lab(f['colourHex']))), f['id']) for f in films if f['usable']]
print(json.dumps([i for _, i in sorted(d)]))
`
  return JSON.parse(execFileSync(PYTHON, ['-c', script, JSON.stringify(ink), JSON.stringify(films)], { encoding: 'utf8' })) as number[]
}

const stock: FilmSwatch[] = [
  { id: 1, colourHex: '#1f4fa3', usable: true }, // blue
  { id: 2, colourHex: '#c0282d', usable: true }, // deep red
  { id: 3, colourHex: '#e8710a', usable: true }, // orange
  { id: 4, colourHex: '#ff0000', usable: false }, // the exact red, but not cleared for the laser
  { id: 5, colourHex: '#fafafa', usable: true }, // white
  { id: 6, colourHex: '#f2c200', usable: true }, // yellow
  { id: 7, colourHex: '#111111', usable: true }, // black
  { id: 8, colourHex: '#d81b60', usable: true }, // raspberry
]

describe('filmsByColour', () => {
  it.each(['#ff0000', '#ffffff', '#f5d000', '#20409a', '#222222', '#ff7f50'])('ranks the cleared films for %s as scikit-image\'s CIEDE2000 does', (ink) => {
    expect(filmsByColour(ink, stock)).toEqual(skimageRanking(ink, stock))
  })

  it('never suggests a film that may not be cut, however close its colour', () => {
    const ranked = filmsByColour('#ff0000', stock)
    expect(ranked).not.toContain(4)
    expect(ranked[0]).toBe(2)
  })
})
