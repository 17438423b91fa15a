import type { Actor } from '../policy'

/** The page a person starts on: a mentor's program, a maker's studio, an operator's lab. */
export function homeFor(actor: Actor): string {
  if (actor.isMentor) return '/program'
  const roles = [...actor.memberships.values()]
  if (roles.includes('designer') || roles.includes('student')) return '/studio'
  if (roles.includes('operator')) return '/lab'
  return '/studio'
}
