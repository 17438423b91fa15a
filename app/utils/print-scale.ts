/** Scales a printed sheet drawing may use: 1 : n, with n from this list (round numbers a ruler reads easily). */
export const PRINT_SCALES = [1, 1.5, 2, 2.5, 3, 4, 5, 6, 8, 10, 15, 20, 25, 30, 40, 50] as const

/**
 * The largest drawing of a `widthMm` × `heightMm` sheet that fits in a `boxWidthMm` ×
 * `boxHeightMm` area of paper at one of PRINT_SCALES: the n of 1 : n.
 */
export function printScale(widthMm: number, heightMm: number, boxWidthMm: number, boxHeightMm: number): number {
  const need = Math.max(widthMm / boxWidthMm, heightMm / boxHeightMm)
  return PRINT_SCALES.find((n) => n >= need - 1e-9) ?? Math.ceil(need)
}
