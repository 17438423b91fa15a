// The shipped plate font, read with opentype.js, against a second font library: Debian's
// python3-fonttools (fontTools.ttLib reads the WOFF; BoundsPen gives a glyph's exact bounds,
// curve extremes included).
import { execFileSync } from 'node:child_process'
import { existsSync, readFileSync } from 'node:fs'
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { PLATE_FONTS, loadPlateFont, plateFontLicencePath, plateFontPath } from '../../../server/plates/font'
import { glyphContours } from '../../../server/plates/outline'
import { measureCurves } from '../../../server/pipeline/geometry'
import { curvesToPathData } from '../../../server/pipeline/trace'

const PYTHON = '/usr/bin/python3'
const CHARS = '0123456789ABCDEFGHIJKLMNOPQRSTUVWXYZ'

interface FontToolsAnswer {
  unitsPerEm: number
  glyphs: Record<string, { name: string; advance: number; bounds: [number, number, number, number] }>
}

function readWithFontTools(file: string): FontToolsAnswer {
  if (!existsSync(PYTHON)) throw new Error(`${PYTHON} is missing: install Debian's python3-fonttools (apt-get install python3-fonttools).`)
  const script = `
import json, sys
try:
    from fontTools.ttLib import TTFont
    from fontTools.pens.boundsPen import BoundsPen
except ImportError:
    sys.exit("fontTools is missing: install Debian's python3-fonttools (apt-get install python3-fonttools)")
f = TTFont(sys.argv[1])
gs = f.getGlyphSet()
cmap = f.getBestCmap()
out = {"unitsPerEm": f["head"].unitsPerEm, "glyphs": {}}
for ch in sys.argv[2]:
    name = cmap[ord(ch)]
    pen = BoundsPen(gs)
    gs[name].draw(pen)
    out["glyphs"][ch] = {"name": name, "advance": f["hmtx"][name][0], "bounds": pen.bounds}
print(json.dumps(out))
`
  return JSON.parse(execFileSync(PYTHON, ['-c', script, file, CHARS], { encoding: 'utf8' })) as FontToolsAnswer
}

describe('plate fonts', () => {
  it.each(PLATE_FONTS.map((f) => [f.id]))('%s: units per em, advance widths and glyph bounds agree with fontTools', (id) => {
    const { font, info } = loadPlateFont(id)
    const ref = readWithFontTools(plateFontPath(info))
    expect(font.unitsPerEm).toBe(ref.unitsPerEm)
    for (const ch of CHARS) {
      const g = font.charToGlyph(ch)
      const r = ref.glyphs[ch]!
      expect(g.name, ch).toBe(r.name)
      expect(g.advanceWidth, ch).toBe(r.advance)
      // Our own bounds, from the outline as the generator converts it (font units, y flipped back).
      const b = measureCurves(glyphContours(g, 0, 0, 1).map((c) => ({ sign: 1 as const, segments: c.segments })), 1).bounds!
      const [xMin, yMin, xMax, yMax] = r.bounds
      expect(b.minX, `${ch} xMin`).toBeCloseTo(xMin, 6)
      expect(b.maxX, `${ch} xMax`).toBeCloseTo(xMax, 6)
      expect(-b.maxY, `${ch} yMin`).toBeCloseTo(yMin, 6)
      expect(-b.minY, `${ch} yMax`).toBeCloseTo(yMax, 6)
      // and opentype.js's own bounding box, for the digits. (For "J" opentype.js 1.3.4's
      // getBoundingBox says xMin 22.84 where fontTools and our curve extremes say 22.49: the
      // generator measures glyphs itself and does not use it.)
      if (!/[0-9]/.test(ch)) continue
      const ob = g.getBoundingBox()
      expect([ob.x1, ob.y1, ob.x2, ob.y2].map((v) => Math.round(v * 1e6) / 1e6), ch).toEqual(r.bounds.map((v) => Math.round(v * 1e6) / 1e6))
    }
  })

  it.each(PLATE_FONTS.map((f) => [f.id]))('%s: no glyph has overlapping contours, so even-odd fill paints it as the font means', async (id) => {
    // The clean vector is filled even-odd; a font's outlines are meant non-zero. They agree only
    // when no two contours of a glyph overlap: librsvg (through sharp) paints both ways.
    const { font } = loadPlateFont(id)
    for (const ch of CHARS) {
      const d = curvesToPathData(glyphContours(font.charToGlyph(ch), 10, 90, 0.1).map((c) => ({ sign: 1 as const, segments: c.segments })))
      const paint = (rule: string) => sharp(Buffer.from(`<svg xmlns="http://www.w3.org/2000/svg" width="400" height="400" viewBox="0 0 100 100"><path d="${d}" fill-rule="${rule}"/></svg>`))
        .ensureAlpha().extractChannel(3).raw().toBuffer()
      const [a, b] = await Promise.all([paint('nonzero'), paint('evenodd')])
      let differ = 0
      for (let i = 0; i < a.length; i++) if (Math.abs(a[i]! - b[i]!) > 64) differ++
      expect(differ, ch).toBe(0)
      expect(a.some((v) => v > 0), `${ch} has ink`).toBe(true)
    }
  })

  it.each(PLATE_FONTS.map((f) => [f.id]))('%s: ships with its licence', (id) => {
    const { info } = loadPlateFont(id)
    expect(info.licence).toBe('OFL-1.1')
    expect(readFileSync(plateFontLicencePath(info), 'utf8')).toMatch(/SIL Open Font License, Version 1\.1/)
  })
})
