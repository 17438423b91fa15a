// A plate as one layered decal: framing its layers with the registration marks and measuring
// each framed layer inside the plate, printed in ms and as ratios to a floor measured in the
// same run (generating the plate's single-colour layers), so runs on a busy machine compare.
import { loadPlateFont } from '../../server/plates/font'
import { framePlate, generatePlate } from '../../server/plates/generate'
import { measureLayer } from '../../server/plates/measure'
import { presetProfile } from '../../shared/plates/profiles'
import { median } from './bench-cutsheet'

/** Median milliseconds of `runs` calls. */
async function timed(runs: number, f: () => unknown): Promise<number> {
  const t: number[] = []
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now()
    await f()
    t.push(performance.now() - t0)
  }
  return median(t)
}

export async function benchLayeredPlates(runs: number): Promise<void> {
  const font = loadPlateFont()
  const ask = (style: 'under' | 'knock-out') => ({ teamNumber: '5150', profile: presetProfile('ftc-2025-26')!, font, background: { colour: 'blue' as const, style } })
  const floor = await timed(runs, () => generatePlate(ask('under')))
  const line = (what: string, ms: number) => console.log(`  ${what.padEnd(58)} ${ms.toFixed(1).padStart(7)} ms  ${(ms / floor).toFixed(1).padStart(6)}× floor`)
  console.log(`\nLayered plates (invented number; floor: generating the plate, ${floor.toFixed(1)} ms):`)
  for (const style of ['under', 'knock-out'] as const) {
    const plate = generatePlate(ask(style))
    const framed = framePlate(plate)
    const b = framed.plateBox
    const within = { minX: b.x0, minY: b.y0, maxX: b.x1, maxY: b.y1 }
    line(`background ${style}: stack and frame both layers with the marks`, await timed(runs, () => framePlate(plate)))
    line('  measure the framed numerals inside the plate (geometry)', await timed(runs, () => measureLayer(framed.layers[1]!.svg, { stroke: false, within })))
  }
}
