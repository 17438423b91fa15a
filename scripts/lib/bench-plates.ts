// Number plates: generating the vector, measuring a layer's geometry, and the narrowest stroke
// at 20 px/mm for numerals of each preset's size, printed in ms and as ratios to a floor
// measured in the same run (the exact distance transform of a 1000 × 1000 bitmap), so runs on
// a busy machine can be compared.
import { squaredDistanceTransform } from '../../server/pipeline/geometry'
import { loadPlateFont } from '../../server/plates/font'
import { generatePlate } from '../../server/plates/generate'
import { measureLayer } from '../../server/plates/measure'
import { presetProfile } from '../../shared/plates/profiles'

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b)
  return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2
}

async function timed(runs: number, f: () => unknown): Promise<number> {
  const t: number[] = []
  for (let i = 0; i < runs; i++) { const t0 = performance.now(); await f(); t.push(performance.now() - t0) }
  return median(t)
}

export async function benchPlates(runs: number): Promise<void> {
  const bitmap = new Uint8Array(1000 * 1000)
  for (let y = 200; y < 800; y++) bitmap.fill(1, y * 1000 + 200, y * 1000 + 800)
  const floor = await timed(runs, () => squaredDistanceTransform(bitmap, 1000, 1000))
  const font = loadPlateFont()
  const line = (what: string, ms: number) => console.log(`  ${what.padEnd(58)} ${ms.toFixed(0).padStart(7)} ms  ${(ms / floor).toFixed(1).padStart(6)}× floor`)
  console.log(`\nNumber plates (invented numbers; floor: distance transform of 1 MP, ${floor.toFixed(0)} ms):`)
  for (const [key, number, strokeRuns] of [['v5rc-2024-25', '4321B', runs], ['ftc-2025-26', '5150', 1], ['frc-2023', '4', 1]] as const) {
    const profile = presetProfile(key)!
    const plate = generatePlate({ teamNumber: number, profile, font })
    const svg = plate.layers.find((l) => l.role === 'numerals')!.svg
    line(`${key} "${number}" (${plate.numeralHeightMm.toFixed(1)} mm numerals): generate`, await timed(runs, () => generatePlate({ teamNumber: number, profile, font })))
    line(`  measure the numerals' geometry`, await timed(runs, () => measureLayer(svg, { stroke: false })))
    line(`  narrowest stroke at 20 px/mm`, await timed(strokeRuns, () => measureLayer(svg)))
  }
}
