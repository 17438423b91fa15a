// Where a program's edited profile values come from: a value the program changed is its own
// from then on; one left as it was keeps the manual's source and wording.
import type { RuleProfile } from './profiles'

/** Equal as JSON values, whatever the order of object keys (the database keeps its own order). */
function sameValue(a: unknown, b: unknown): boolean {
  if (a === b) return true
  if (typeof a !== 'object' || typeof b !== 'object' || a === null || b === null) return false
  if (Array.isArray(a) !== Array.isArray(b)) return false
  const ka = Object.keys(a), kb = Object.keys(b)
  if (ka.length !== kb.length) return false
  return ka.every((k) => Object.hasOwn(b, k) && sameValue((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k]))
}

interface Ruled { value: unknown; source: { provenance: string }; stated?: string }

/**
 * The edited profile with each changed value marked 'set by the program' (its manual and rule
 * stay beside it) and the manual's wording dropped from it, which no longer describes it.
 */
export function markChanged(before: RuleProfile, after: RuleProfile): RuleProfile {
  const out = structuredClone(after)
  const mark = (b: Ruled | null, a: Ruled | null) => {
    if (!a || sameValue(a.value, b?.value)) return
    a.source.provenance = 'set by the program'
    delete a.stated
  }
  for (const k of ['minHeight', 'maxHeight', 'minStroke', 'colours'] as const) mark(before.numerals[k], out.numerals[k])
  for (const k of ['minWidth', 'minHeight', 'margin', 'backgrounds'] as const) mark(before.plate[k], out.plate[k])
  mark(before.sides, out.sides)
  mark(before.allianceColours, out.allianceColours)
  return out
}
