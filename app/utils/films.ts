import type { PolymerVerdict } from '#shared/films/polymers'
import type { Film } from '#shared/types/films'

type Kind = 'ok' | 'off' | 'caution' | 'danger'

/** How a verdict looks as a status word. */
export function verdictKind(v: PolymerVerdict): Kind {
  return v === 'allowed' ? 'ok' : v === 'ask-the-lab' ? 'caution' : 'danger'
}

/** A film's standing at the laser as one status word. */
export function filmStatus(f: Pick<Film, 'cleared' | 'retired' | 'labApproval' | 'polymer'>): { kind: Kind; label: string } {
  if (!f.cleared) return f.polymer.verdict === 'never' ? { kind: 'danger', label: 'Never cut' } : { kind: 'caution', label: 'Needs the lab\'s approval' }
  if (f.retired) return { kind: 'off', label: 'Retired' }
  return f.labApproval ? { kind: 'ok', label: 'Lab approved' } : { kind: 'ok', label: 'Can be cut' }
}
