/**
 * The longest round length (1, 2 or 5 × 10ⁿ mm, up to 50 m) whose bar stays within maxPx at
 * `scale` pixels per millimetre, for the "all drawn to one scale" bars under decal pictures.
 */
export function niceLength(scale: number, maxPx: number): { mm: number; px: number } {
  let best = 1
  for (let e = 0; e <= 4; e++) {
    for (const k of [1, 2, 5]) {
      const len = k * 10 ** e
      if (len * scale <= maxPx) best = len
    }
  }
  return { mm: best, px: best * scale }
}
