/** Folds case and accents, so "zoe" finds "Zoë" (Unicode canonical decomposition, marks dropped). */
function fold(s: string): string {
  return s.normalize('NFD').replace(/\p{M}+/gu, '').toLowerCase()
}

/** True when every word of `query` appears in one of `fields`; an empty query matches everything. */
export function matchesSearch(fields: readonly (string | null | undefined)[], query: string): boolean {
  const words = fold(query).split(/\s+/).filter(Boolean)
  if (!words.length) return true
  const haystack = fields.filter(Boolean).map((f) => fold(f!))
  return words.every((w) => haystack.some((h) => h.includes(w)))
}
