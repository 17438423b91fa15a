// Films suggested for a layer of a decal: the cleared films in stock, nearest in colour to the
// layer's ink first. Colour difference is CIEDE2000 between the ink and the film's swatch, both
// read as sRGB into CIELAB (D65) by server/pipeline/colour/lab.ts.
import { deltaE00, srgbToLab, type Lab } from '../pipeline/colour/lab'

export interface FilmSwatch { id: number; colourHex: string; usable: boolean }

function labOf(hex: string): Lab | null {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})$/i.exec(hex)
  return m ? srgbToLab(parseInt(m[1]!, 16), parseInt(m[2]!, 16), parseInt(m[3]!, 16)) : null
}

/** The usable films' ids, nearest to the ink's colour first (ties by id); films without a readable swatch last. */
export function filmsByColour(inkHex: string, films: FilmSwatch[]): number[] {
  const ink = labOf(inkHex)
  const scored = films.filter((f) => f.usable).map((f) => {
    const lab = labOf(f.colourHex)
    return { id: f.id, d: ink && lab ? deltaE00(ink, lab) : Infinity }
  })
  return scored.sort((a, b) => a.d - b.d || a.id - b.id).map((s) => s.id)
}
