import { describe, expect, it } from 'vitest'
import { SCREEN_LINES, screenSheetSvg, sheetWorkWords } from '../../../app/utils/sheet-preview'

const FILE = [
  '<svg xmlns="http://www.w3.org/2000/svg" width="100mm" height="50mm" viewBox="0 0 100 50">',
  '<defs><path id="dw-design-J1" d="M0 0H10V10H0Z"/></defs>',
  '<g id="dw-sheet-1" fill="none" stroke="#2f5d50" stroke-width="0.1">',
  '<g id="dw-sheet-1-weeding"><path d="M0 20L100 20"/></g>',
  '<g id="dw-sheet-1-copies"><use id="dw-copy-1-1" xlink:href="#dw-design-J1" transform="translate(5 5)"/></g>',
  '</g>',
  '</svg>',
].join('\n')

describe('screenSheetSvg', () => {
  it('adds the screen style right after the root tag and leaves every line of the file as it was', () => {
    const out = screenSheetSvg(FILE)
    const root = FILE.split('\n')[0]!
    expect(out.startsWith(`${root}\n<style>`)).toBe(true)
    expect(out.replace(/\n<style>[^<]*<\/style>/, '')).toBe(FILE)
    // Fixed screen widths (SVG 2, 'vector-effect': non-scaling-stroke), a pattern per kind of line.
    expect(out).toContain('vector-effect:non-scaling-stroke')
    expect(out).toContain(`g[id$="-weeding"] path{vector-effect:non-scaling-stroke;stroke:${SCREEN_LINES.weeding.colour};stroke-width:${SCREEN_LINES.weeding.widthPx}px;stroke-dasharray:${SCREEN_LINES.weeding.dash}`)
    const dashes = new Set(Object.values(SCREEN_LINES).map((l) => l.dash))
    expect(dashes.size).toBe(Object.keys(SCREEN_LINES).length)
  })

  it('refuses what is not an SVG document', () => {
    expect(() => screenSheetSvg('{"message":"no"}')).toThrow(/not an SVG/)
  })
})

describe('sheetWorkWords', () => {
  it('says what the work item is doing, with its share done', () => {
    expect(sheetWorkWords({ state: 'queued', phase: 'waiting', percent: 0 })).toEqual({ words: 'Waiting for a free worker…', percent: 0 })
    expect(sheetWorkWords({ state: 'running', phase: 'outlining', percent: 15 }).words).toMatch(/Laying out/)
    expect(sheetWorkWords({ state: 'running', phase: 'storing', percent: 80 }).words).toMatch(/Keeping/)
  })
})
