// The tuning bench's clean-up choices and the sheet's corners: pure helpers of app/utils.
import { describe, expect, it } from 'vitest'
import type { CleanUpChoice } from '../../../shared/types/pipeline'
import { parseSettings } from '../../../shared/utils/settings'
import { choiceOf, choiceOptions, choiceValueWords, chooseOption, keepChoice, OVERRIDABLE, selectedOption } from '../../../app/utils/bench-choices'
import { cornerKeyMove, cornerStep, HANDLE_PX, insetCorners, moveCorner, placeCorner, shownCorners, type Corners } from '../../../app/utils/bench-corners'
import { viewBetween } from '../../../app/utils/bench-view'

const found: Corners = [{ x: 100.4, y: 50 }, { x: 1100, y: 80.2 }, { x: 1080, y: 760 }, { x: 120, y: 740 }]
const choices: CleanUpChoice[] = [
  { setting: 'corners', automatic: true, value: { mode: 'manual', points: found }, reason: 'The sheet was photographed at an angle.' },
  { setting: 'lightingEvening', automatic: true, value: { mode: 'on', strength: 1 }, reason: 'The paper is darker at the bottom right.' },
  { setting: 'inkColour', automatic: true, value: 'dark', reason: 'Dark ink.' },
  { setting: 'dropoutColour', automatic: true, value: { mode: 'colours', colours: ['#a6bfd5'] }, reason: 'Blue grid.' },
  { setting: 'paperLines', automatic: true, value: 'remove', reason: 'A grid.' },
  { setting: 'threshold', automatic: true, value: { mode: 'adaptive', windowMm: 8, k: 0.17, r: 95 }, reason: 'Faint.' },
  { setting: 'thickenToMm', automatic: false, value: null, reason: 'Strokes are kept as drawn.' },
  { setting: 'marginMm', automatic: false, value: 0, reason: 'Trimmed.' },
]

describe('clean-up choices on the bench', () => {
  it('keeping an automatic choice writes its value into the settings, so the pipeline reads it as set', () => {
    let s = parseSettings({})
    for (const c of choices) s = keepChoice(s, c)
    // what was written parses as settings, every choice pinned to what the run used
    const parsed = parseSettings(JSON.parse(JSON.stringify(s)))
    expect(parsed.corners).toEqual({ mode: 'manual', points: found })
    expect(parsed.lightingEvening).toEqual({ mode: 'on', strength: 1 })
    expect(parsed.dropoutColour).toEqual({ mode: 'colours', colours: ['#a6bfd5'] })
    expect(parsed.threshold).toEqual({ mode: 'adaptive', windowMm: 8, k: 0.17, r: 95 })
    expect(OVERRIDABLE.every((k) => selectedOption(k, parsed) !== 'auto')).toBe(true)
    // a kept value is a copy: changing the settings later leaves the run's report alone
    ;(s.corners as { points: Corners }).points[0].x = 0
    expect(found[0].x).toBe(100.4)
  })

  it('offers Automatic first, then explicit values, including what the run found', () => {
    const s = parseSettings({})
    for (const k of OVERRIDABLE) {
      const options = choiceOptions(k, s, choiceOf(choices, k))
      expect(options[0]!.label).toBe('Automatic')
      expect(options.length).toBeGreaterThanOrEqual(3)
      expect(new Set(options.map((o) => o.key)).size).toBe(options.length)
      // every option is a value the pipeline's schema accepts
      for (const o of options) expect(() => parseSettings({ [k]: o.value })).not.toThrow()
    }
    expect(choiceOptions('corners', s, undefined).map((o) => o.key)).toEqual(['auto', 'off'])
    expect(choiceOptions('dropoutColour', s, undefined).map((o) => o.key)).toEqual(['auto', 'none'])
    const off = chooseOption(s, 'paperLines', choiceOptions('paperLines', s, undefined)[1]!)
    expect(off.paperLines).toBe('keep')
    expect(selectedOption('paperLines', off)).toBe('keep')
    expect(selectedOption('lightingEvening', s)).toBe('auto')
  })

  it('says each value in words', () => {
    expect(choices.map(choiceValueWords)).toEqual([
      'Straightened from four corners', 'On, strength 100 %', 'Darkness', '#a6bfd5', 'Taken out',
      'Local, 8 mm window (Sauvola)', 'Kept as drawn', 'Trimmed to the ink',
    ])
    expect(choiceValueWords({ setting: 'thickenToMm', automatic: false, value: 0.8, reason: '' })).toBe('Thickened to 0.8 mm')
  })
})

describe('the sheet\'s corners', () => {
  const world = { width: 1200, height: 800 }

  it('are the ones set, or the ones the run found, or none', () => {
    expect(shownCorners(parseSettings({}), choices)).toEqual({ points: found, source: 'found' })
    expect(shownCorners(parseSettings({ corners: { mode: 'off' } }), choices)).toBeNull()
    expect(shownCorners(parseSettings({}), [])).toBeNull()
    const set = insetCorners(world)
    expect(shownCorners(parseSettings({ corners: { mode: 'manual', points: set } }), choices)).toEqual({ points: set, source: 'set' })
    expect(set).toEqual([{ x: 60, y: 40 }, { x: 1140, y: 40 }, { x: 1140, y: 760 }, { x: 60, y: 760 }])
  })

  it('move by a source pixel with an arrow key, by a fiftieth of the long side with Shift, and stay on the picture', () => {
    expect(cornerStep(world, false)).toBe(1)
    expect(cornerStep(world, true)).toBe(24)
    expect(cornerKeyMove('ArrowLeft', false, world)).toEqual({ dx: -1, dy: 0 })
    expect(cornerKeyMove('ArrowDown', true, world)).toEqual({ dx: 0, dy: 24 })
    expect(cornerKeyMove('Enter', false, world)).toBeNull()
    const moved = moveCorner(found, 0, -1, 0, world)
    expect(moved[0]).toEqual({ x: 99.4, y: 50 })
    expect(moved[1]).toEqual(found[1])
    expect(moveCorner(found, 2, 500, 500, world)[2]).toEqual({ x: 1200, y: 800 })
    expect(placeCorner(found, 3, { x: -5, y: 300.04 }, world)[3]).toEqual({ x: 0, y: 300 })
  })

  it('have targets of at least 24 × 24 CSS px (WCAG 2.2, success criterion 2.5.8)', () => {
    expect(HANDLE_PX).toBeGreaterThanOrEqual(24)
  })
})

describe('the decal beside the source', () => {
  it('shares the zoom and the centre\'s place relative to each picture', () => {
    const v = viewBetween({ zoom: 2, cx: 300, cy: 600 }, { width: 1200, height: 800 }, { width: 900, height: 400 })
    expect(v).toEqual({ zoom: 2, cx: 225, cy: 300 })
    const back = viewBetween(v, { width: 900, height: 400 }, { width: 1200, height: 800 })
    expect(back).toEqual({ zoom: 2, cx: 300, cy: 600 })
  })
})
