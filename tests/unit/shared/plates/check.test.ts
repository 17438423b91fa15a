// Hand-worked robots against the preset profiles. Each expected result was worked out by
// reading the profile's rule (as issue 13 quotes the manuals) against the placements listed.
import { describe, expect, it } from 'vitest'
import { checkRobotPlates, plateColourOf, scaleToPlacement, type PlacedPlate, type RuleResult } from '../../../../shared/plates/check'
import { presetProfile, type RuleProfile } from '../../../../shared/plates/profiles'

const profile = (key: string): RuleProfile => presetProfile(key)!
const FTC = 'ftc-2025-26', VEX = 'v5rc-2024-25', FRC = 'frc-2023'

/** A plate that meets the FTC preset (numerals 2 in, plate 7 × 2.75 in, ¼ in margin and more). */
function ftcPlate(side: PlacedPlate['side'], over: Partial<PlacedPlate> = {}): PlacedPlate {
  return {
    side, numeralHeightMm: 50.8, strokeMm: 14, plateWidthMm: 177.8, plateHeightMm: 69.85, marginMm: 9.5,
    backgroundColour: 'Signal red', numeralColour: 'Bright white', quantity: 1, spares: 1, ...over,
  }
}
function vexPlate(side: PlacedPlate['side'], colour: 'red' | 'blue', over: Partial<PlacedPlate> = {}): PlacedPlate {
  return {
    side, numeralHeightMm: 30, strokeMm: 8, plateWidthMm: 114, plateHeightMm: 63, marginMm: 5,
    backgroundColour: `${colour} gloss`, numeralColour: 'white', quantity: 1, spares: 0, ...over,
  }
}
function frcNumerals(side: PlacedPlate['side'], over: Partial<PlacedPlate> = {}): PlacedPlate {
  return {
    side, numeralHeightMm: 101.6, strokeMm: 29, plateWidthMm: 260, plateHeightMm: 114, marginMm: 6,
    backgroundColour: null, numeralColour: 'white', quantity: 1, spares: 2, ...over,
  }
}
const byRule = (results: RuleResult[]) => Object.fromEntries(results.map((r) => [r.rule, r]))

describe('checkRobotPlates', () => {
  it('passes a robot that meets every FTC rule, naming each rule number', () => {
    const r = checkRobotPlates(profile(FTC), [ftcPlate('front'), ftcPlate('left', { backgroundColour: 'Royal blue' })])
    expect(r.map((x) => x.rule)).toEqual(['sides', 'numeral-height', 'numeral-colour', 'plate-size', 'margin', 'background'])
    expect(r.every((x) => x.passed)).toBe(true)
    expect(byRule(r).sides!.sentence).toBe('Plates on the front and left: two plates at least 90° apart, as the rules ask.')
    expect(byRule(r).sides!.source.rule).toBe('R401')
    expect(byRule(r).background!.source.rule).toBe('R402')
  })

  it('two sides: one opposite pair is needed, and the missing side is named', () => {
    const vex = profile(VEX)
    const frontOnly = byRule(checkRobotPlates(vex, [vexPlate('front', 'red'), vexPlate('front', 'blue')]))
    expect(frontOnly.sides).toMatchObject({ passed: false, sentence: 'No plate on the back: the rules ask for two opposite sides.' })
    // front and left are 90° apart, not opposite: either opposite would do
    const corner = byRule(checkRobotPlates(vex, [vexPlate('front', 'red'), vexPlate('left', 'red')]))
    expect(corner.sides!.sentence).toBe('No plate on the back or right: the rules ask for two opposite sides.')
    const pair = byRule(checkRobotPlates(vex, [vexPlate('left', 'red'), vexPlate('right', 'red')]))
    expect(pair.sides!.passed).toBe(true)
    // FTC: two plates on the same side are not 90° apart; a top plate does not count
    const ftc = profile(FTC)
    const same = byRule(checkRobotPlates(ftc, [ftcPlate('front'), ftcPlate('front')]))
    expect(same.sides!.sentence).toBe('Plates only on the front: the rules ask for two plates at least 90° apart.')
    const top = byRule(checkRobotPlates(ftc, [ftcPlate('top')]))
    expect(top.sides!.sentence).toBe('No plate on the front, back, left or right (a plate on the top or elsewhere does not count): the rules ask for two plates at least 90° apart.')
    const none = checkRobotPlates(ftc, [])
    expect(byRule(none).sides!.sentence).toBe('No plate placed: the rules ask for two plates at least 90° apart.')
    expect(byRule(none)['numeral-height']).toMatchObject({ passed: false, sentence: 'No plate is placed to measure: the rules ask for numerals 44.45 to 69.85 mm tall (1.75 to 2.75 in).' })
  })

  it('every side: FRC numerals must be on front, back, left and right', () => {
    const r = byRule(checkRobotPlates(profile(FRC), [frcNumerals('front'), frcNumerals('back'), frcNumerals('left')]))
    expect(r.sides!.sentence).toBe('No plate on the right: the rules ask for numerals readable from every side (front, back, left and right).')
    const all = checkRobotPlates(profile(FRC), ['front', 'back', 'left', 'right'].map((s) => frcNumerals(s as PlacedPlate['side'])))
    expect(all.map((x) => x.rule)).toEqual(['sides', 'numeral-height', 'numeral-stroke', 'numeral-colour'])
    expect(all.every((x) => x.passed)).toBe(true)
  })

  it('wrong colour: yellow background and black numerals are named', () => {
    const r = byRule(checkRobotPlates(profile(FTC), [
      ftcPlate('front', { backgroundColour: 'Sunflower yellow' }),
      ftcPlate('back', { numeralColour: 'Jet black' }),
    ]))
    expect(r.background).toMatchObject({ passed: false, sentence: 'The front plate is yellow: the rules ask for a red or blue background.' })
    expect(r['numeral-colour']).toMatchObject({ passed: false, sentence: 'The numerals on the back plate are black: the rules ask for white numerals.' })
    expect(r.sides!.passed).toBe(true)
    const unread = byRule(checkRobotPlates(profile(FTC), [ftcPlate('front', { backgroundColour: 'Sunset', spot: 'arm' }), ftcPlate('back', { backgroundColour: null })]))
    expect(unread.background!.sentence).toBe('The background film of the front plate (arm) is “Sunset”, not a colour the check can read; the back plate has no background film: the rules ask for a red or blue background.')
  })

  it('too small: numerals, strokes and plates below the minimum fail, the slack of the 0.01 mm grid passes', () => {
    const frc = profile(FRC)
    const sides = ['back', 'left', 'right'].map((s) => frcNumerals(s as PlacedPlate['side']))
    const small = byRule(checkRobotPlates(frc, [frcNumerals('front', { numeralHeightMm: 88.9, strokeMm: 9.8 }), ...sides]))
    expect(small['numeral-height']!.sentence).toBe('The numerals on the front plate are 88.9 mm tall: the rules ask for numerals at least 101.6 mm (4 in) tall.')
    expect(small['numeral-stroke']!.sentence).toBe('The narrowest stroke of the numerals on the front plate is 9.8 mm: the rules ask for strokes at least 12.7 mm (0.5 in) wide.')
    // 4 in generated exactly may read 101.59 mm on the 0.01 mm grid; 101.58 mm is too small
    expect(byRule(checkRobotPlates(frc, [frcNumerals('front', { numeralHeightMm: 101.595 }), ...sides]))['numeral-height']!.passed).toBe(true)
    expect(byRule(checkRobotPlates(frc, [frcNumerals('front', { numeralHeightMm: 101.58 }), ...sides]))['numeral-height']!.passed).toBe(false)
    // FTC: too tall is as wrong as too short; a plate is judged either way round
    const ftc = byRule(checkRobotPlates(profile(FTC), [
      ftcPlate('front', { numeralHeightMm: 71 }),
      ftcPlate('left', { plateWidthMm: 63.5, plateHeightMm: 165.1 }),
      ftcPlate('back', { plateWidthMm: 160, plateHeightMm: 70, marginMm: 5 }),
    ]))
    expect(ftc['numeral-height']!.sentence).toBe('The numerals on the front plate are 71 mm tall: the rules ask for numerals 44.45 to 69.85 mm tall (1.75 to 2.75 in).')
    expect(ftc['plate-size']!.sentence).toBe('The back plate is 160 × 70 mm: the rules ask for a plate at least 165.1 × 63.5 mm (6.5 × 2.5 in).')
    expect(ftc.margin!.sentence).toBe('The numerals on the back plate are 5 mm from its edge: the rules ask for a margin of at least 6.35 mm (0.25 in) around the numerals.')
    const unmeasured = byRule(checkRobotPlates(frc, [frcNumerals('front', { numeralHeightMm: null }), ...sides]))
    expect(unmeasured['numeral-height']!.sentence).toMatch(/^The numeral height of the front plate has not been measured: /)
  })

  it('a spare is not counted as a placed plate', () => {
    const vex = profile(VEX)
    const r = byRule(checkRobotPlates(vex, [
      vexPlate('front', 'red'), vexPlate('back', 'red', { quantity: 0, spares: 2 }),
      vexPlate('front', 'blue'), vexPlate('back', 'blue'),
    ]))
    expect(r.sides!.passed).toBe(true) // the blue pair is on front and back
    expect(r['alliance-colours']).toMatchObject({
      passed: false,
      sentence: 'No red plate on the back (the spares for the back are not placed plates): the rules ask for red and blue plates, each on two opposite sides.',
    })
    // A spares-only placement is not judged either: its too-small numerals do not fail the robot.
    const ftc = byRule(checkRobotPlates(profile(FTC), [ftcPlate('front'), ftcPlate('left'), ftcPlate('back', { quantity: 0, spares: 3, numeralHeightMm: 20 })]))
    expect(ftc['numeral-height']!.passed).toBe(true)
    const onlySpares = byRule(checkRobotPlates(profile(FTC), [ftcPlate('front', { quantity: 0 }), ftcPlate('left', { quantity: 0 })]))
    expect(onlySpares.sides!.sentence).toBe('No plate placed (the spares for the front and left are not placed plates): the rules ask for two plates at least 90° apart.')
  })

  it('both alliance colours: a robot with only red plates misses blue', () => {
    const r = byRule(checkRobotPlates(profile(VEX), [vexPlate('front', 'red'), vexPlate('back', 'red')]))
    expect(r.sides!.passed).toBe(true)
    expect(r['alliance-colours']).toMatchObject({
      passed: false,
      sentence: 'No blue plate placed: the rules ask for red and blue plates, each on two opposite sides.',
    })
    expect(r['alliance-colours']!.source.rule).toBe('R10')
    const both = byRule(checkRobotPlates(profile(VEX), [
      vexPlate('front', 'red'), vexPlate('back', 'red'), vexPlate('left', 'blue'), vexPlate('right', 'blue'),
    ]))
    expect(both['alliance-colours']).toMatchObject({ passed: true, sentence: 'Red and blue plates, each on two opposite sides, as the rules ask.' })
  })
})

describe('plateColourOf', () => {
  it('reads one colour word from a film colour name', () => {
    expect(plateColourOf('Signal red')).toBe('red')
    expect(plateColourOf('Off-white matt')).toBe('white')
    expect(plateColourOf('Light Gray')).toBe('grey')
    expect(plateColourOf('BLUE')).toBe('blue')
    expect(plateColourOf('blue-black')).toBeNull()
    expect(plateColourOf('Sunset')).toBeNull()
    expect(plateColourOf('reddish')).toBeNull()
    expect(plateColourOf(null)).toBeNull()
  })
})

describe('scaleToPlacement', () => {
  it('scales lengths measured on the revision by placement width ÷ revision width', () => {
    const placed = scaleToPlacement({ numeralHeightMm: 50, strokeMm: 12, marginMm: null }, 200, 150)
    expect(placed).toEqual({ numeralHeightMm: 37.5, strokeMm: 9, marginMm: null })
    expect(() => scaleToPlacement({ a: 1 }, 0, 10)).toThrow(RangeError)
  })
})
