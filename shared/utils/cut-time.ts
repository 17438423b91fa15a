// Estimated cut time of a job, from the film's laser settings.
//
//   time = (cut length × passes) ÷ speed  +  pieces × passes × MOVE_ALLOWANCE_S
//
// The first term is the beam travelling along every outline at the set speed. The second is
// a stated allowance for the moves between pieces and the accelerations at their starts
// (common practice to allow for it; half a second is our own round figure, not a
// measurement of any machine). Time spent on the machine's own homing and focus is not in it.
export const MOVE_ALLOWANCE_S = 0.5

export interface CutTimeInput {
  cutLengthMm: number
  pieces: number
  speedMmS: number
  passes: number
}

/** The registration marks cut with a layer on its sheet: their outlines' length and how many outlines they are. */
export interface MarksCut { cutLengthMm: number; outlines: number }

/**
 * What one copy cuts: every outline of the design (pieces and holes) and, on a layer's sheet,
 * the registration marks beside it. The marks are outside the layer's measurements (those
 * describe the decal), yet the beam cuts them with every copy of every layer.
 */
export function cutPerCopy(m: { cutLengthMm: number; pieces: number; holes: number }, marks: MarksCut | null = null): { cutLengthMm: number; outlines: number } {
  return { cutLengthMm: m.cutLengthMm + (marks?.cutLengthMm ?? 0), outlines: m.pieces + m.holes + (marks?.outlines ?? 0) }
}

export function estimateCutSeconds(i: CutTimeInput): number {
  if (!(i.speedMmS > 0)) throw new RangeError('The laser speed must be positive.')
  return (i.cutLengthMm * i.passes) / i.speedMmS + i.pieces * i.passes * MOVE_ALLOWANCE_S
}

export function formatDuration(seconds: number): string {
  const s = Math.round(seconds)
  if (s < 60) return `${s} s`
  const m = Math.floor(s / 60)
  if (m < 60) return `${m} min ${String(s % 60).padStart(2, '0')} s`
  return `${Math.floor(m / 60)} h ${String(m % 60).padStart(2, '0')} min`
}
