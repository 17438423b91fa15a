// The drawn histogram of grey levels under the threshold control.
//
// Paper fills most of a drawing, so its bin dwarfs the rest; on a straight scale the ink and
// the grey in between vanish. A square-root scale keeps the clusters a designer picks a
// threshold between (ink, paper, a grey fill) clearly visible, where a logarithmic one would
// raise the scattered edge pixels to the same height; any bin that is not empty is drawn at
// least one unit tall, so even a few pixels show.

export function histogramHeights(counts: readonly number[], height: number): number[] {
  let max = 0
  for (const c of counts) if (c > max) max = c
  if (max <= 0) return counts.map(() => 0)
  const top = Math.sqrt(max)
  return counts.map((c) => (c > 0 ? Math.max(1, (Math.sqrt(c) / top) * height) : 0))
}

/** One SVG path of the histogram's bars (bin i spans x = i … i + 1), baseline at `height`. */
export function histogramPath(counts: readonly number[], height: number): string {
  const h = histogramHeights(counts, height)
  let d = ''
  for (let i = 0; i < h.length; i++) {
    const v = h[i]!
    if (v <= 0) continue
    d += `M${i} ${height}v${(-v).toFixed(2)}h1v${v.toFixed(2)}z`
  }
  return d
}

/** Grey level under a pointer at `x` screen pixels across a histogram `width` pixels wide. */
export function levelAt(x: number, width: number): number {
  if (!(width > 0)) return 0
  return Math.min(255, Math.max(0, Math.floor((x / width) * 256)))
}

/** Share of pixels at or below the level (what becomes ink, before swapping). */
export function inkShare(counts: readonly number[], level: number): number {
  let ink = 0
  let total = 0
  for (let i = 0; i < counts.length; i++) {
    total += counts[i]!
    if (i <= level) ink += counts[i]!
  }
  return total > 0 ? ink / total : 0
}

/** Levels an arrow key moves the marker with Shift held, as Page Up and Page Down do. */
export const LEVEL_BIG_STEP = 10

/** Slider keys (Shift with an arrow for a larger step): the new level, or null for a key the slider does not use. */
export function levelAfterKey(key: string, level: number, shift = false): number | null {
  const step = shift ? LEVEL_BIG_STEP : 1
  switch (key) {
    case 'ArrowLeft': case 'ArrowDown': return Math.max(0, level - step)
    case 'ArrowRight': case 'ArrowUp': return Math.min(255, level + step)
    case 'PageDown': return Math.max(0, level - LEVEL_BIG_STEP)
    case 'PageUp': return Math.min(255, level + LEVEL_BIG_STEP)
    case 'Home': return 0
    case 'End': return 255
    default: return null
  }
}
