import type { AuditEntry } from '#shared/types/api'
import { isAuditAction } from '#shared/types/audit'
import { roleLabel } from './format'

/**
 * Turns an audit entry into a sentence a mentor can read at a glance:
 * "Sam Reyes invited Ana Ortiz as student to Copper Wrens".
 *
 * Every action of the shared union (shared/types/audit.ts) is handled one by one, and the
 * compiler checks none is missing; a line written by a newer server falls back to a reading
 * of the action's words.
 */
export interface AuditSentence {
  /** Who did it, or null when nobody was signed in. */
  actor: string | null
  /** What happened, without the actor: "invited Ana Ortiz as student to Copper Wrens". */
  phrase: string
  /** The whole sentence. */
  sentence: string
}

export interface AuditContext {
  /** Looks up a team's current name by id, for entries that only carry the id. */
  teamName?: (id: number) => string | undefined
}

type Detail = Record<string, unknown>

function text(d: Detail, ...keys: string[]): string | null {
  for (const k of keys) {
    const v = d[k]
    if (typeof v === 'string' && v.trim()) return v.trim()
    if (typeof v === 'number' && Number.isFinite(v)) return String(v)
    if (typeof v === 'number') return String(v)
  }
  return null
}

const role = (r: unknown) => roleLabel(typeof r === 'string' ? r : '').toLowerCase()

const PLACEMENT_FIELDS: Record<string, string> = { spot: 'spot', widthMm: 'width (mm)', quantity: 'on the robot', spares: 'spares', side: 'side', neededAtEvents: 'needed at events' }

export function capitalise(s: string): string {
  return s ? s.charAt(0).toUpperCase() + s.slice(1) : s
}

function known(e: AuditEntry, d: Detail, ctx: AuditContext): string {
  const subject = e.subjectId ? `${e.subjectType} #${e.subjectId}` : e.subjectType
  const name = text(d, 'name') ?? subject
  switch (e.action) {
    case 'sign-in':
      return 'signed in'
    case 'sign-in-failed': {
      const reason = text(d, 'reason')
      return reason ? `could not sign in (${reason})` : 'could not sign in'
    }
    case 'create-team':
      return `created the team ${name}`
    case 'update-team': {
      const current = e.subjectId ? ctx.teamName?.(Number(e.subjectId)) : undefined
      const renamed = text(d, 'name')
      const others = ['number', 'colour'].filter((k) => k in d)
      const rest = others.length ? ` and changed its ${others.join(' and ')}` : ''
      if (renamed) return `renamed a team to ${renamed}${rest}`
      return `changed the ${others.join(' and ') || 'details'} of ${current ?? subject}`
    }
    case 'rename-person':
      return `renamed ${text(d, 'from') ?? subject} to ${text(d, 'to') ?? 'a new name'}`
    case 'deactivate':
      return `deactivated ${name}`
    case 'reactivate':
      return `reactivated ${name}`
    case 'sign-out-everywhere':
      return `signed ${name} out on every device`
    case 'change-role': {
      if (typeof d.mentor === 'boolean') return d.mentor ? `made ${name} a mentor` : `removed ${name} as a mentor`
      const team = text(d, 'team') ?? 'a team'
      const from = d.from ? role(d.from) : null
      const to = d.to ? role(d.to) : null
      if (!from && to) return `added ${name} to ${team} as ${to}`
      if (from && !to) return `removed ${name} from ${team}`
      return `changed the role of ${name} in ${team} from ${from ?? 'none'} to ${to ?? 'none'}`
    }
    case 'invite': {
      const who = text(d, 'name', 'email') ?? subject
      const as = d.role ? ` as ${role(d.role)}` : ''
      const team = text(d, 'team')
      return `invited ${who}${as}${team ? ` to ${team}` : ''}`
    }
    case 'withdraw-invitation':
      return `withdrew the invitation for ${text(d, 'email', 'name') ?? subject}`
    case 'accept-invitation':
      return d.role ? `accepted the invitation and joined as ${role(d.role)}` : 'accepted the invitation'
    case 'request-reset':
      return 'asked for a password reset link'
    case 'set-first-password':
      return 'set a password for the first time'
    case 'reset-password':
      return 'chose a new password with a reset link'
    case 'upload': {
      const title = text(d, 'title')
      return title ? `uploaded the drawing “${title}”` : 'uploaded a drawing'
    }
    case 'revise': {
      const title = text(d, 'title')
      const n = text(d, 'revision')
      return `made ${n ? `revision ${n}` : 'a new revision'}${title ? ` of “${title}”` : ''}`
    }
    case 'submit':
      return `submitted revision ${text(d, 'revision') ?? ''} of “${text(d, 'title') ?? subject}” for review`
    case 'approve':
      return `approved revision ${text(d, 'revision') ?? ''} of “${text(d, 'title') ?? subject}”${text(d, 'comment') ? `: “${text(d, 'comment')}”` : ''}`
    case 'send-back':
      return `sent revision ${text(d, 'revision') ?? ''} of “${text(d, 'title') ?? subject}” back: “${text(d, 'comment') ?? ''}”`
    case 'place':
      return `placed “${text(d, 'title') ?? 'a decal'}” r${text(d, 'revision') ?? '?'} on the ${text(d, 'spot') ?? 'robot'} in ${text(d, 'film') ?? 'film'} (${text(d, 'quantity') ?? '?'} + ${text(d, 'spares') ?? '0'} spare)`
    case 'queue-job':
      return `queued ${text(d, 'quantity') ?? ''} × “${text(d, 'title') ?? 'a decal'}” for ${text(d, 'robot') ?? 'a robot'} (job ${e.subjectId})`
    case 'reprint':
      return `asked for a reprint of ${text(d, 'quantity') ?? ''} × “${text(d, 'title') ?? 'a decal'}” for ${text(d, 'robot') ?? 'a robot'}${text(d, 'reason') ? `: ${text(d, 'reason')}` : ''} (job ${e.subjectId})`
    case 'mark-cut': {
      const sheets = text(d, 'sheets')
      return `cut job ${e.subjectId} (“${text(d, 'title') ?? ''}”)${sheets ? ` on ${sheets} sheet${sheets === '1' ? '' : 's'}` : ''}`
    }
    case 'mark-applied': {
      const applied = text(d, 'applied')
      return `applied ${applied ? `${applied} of ` : ''}job ${e.subjectId} (“${text(d, 'title') ?? ''}”) to ${text(d, 'robot') ?? 'the robot'}, ${text(d, 'spot') ?? ''}`
    }
    case 'queue-extra':
      return `queued ${text(d, 'quantity') ?? ''} more × “${text(d, 'title') ?? 'a decal'}” for ${text(d, 'robot') ?? 'a robot'} (job ${e.subjectId})`
    case 'recut':
      return `queued a recut of ${text(d, 'quantity') ?? ''} × “${text(d, 'title') ?? 'a decal'}” after job ${text(d, 'recutOf') ?? '?'} failed (job ${e.subjectId})`
    case 'cancel-job':
      return `cancelled job ${e.subjectId} (“${text(d, 'title') ?? ''}”): ${text(d, 'reason') ?? ''}`
    case 'fail-job':
      return `recorded that job ${e.subjectId} (“${text(d, 'title') ?? ''}”) failed: ${text(d, 'failure') ?? 'failed'}${text(d, 'note') ? `, ${text(d, 'note')}` : ''}; recut as job ${text(d, 'recutJobId') ?? '?'}`
    case 'join-batch':
      return `put job ${e.subjectId} (“${text(d, 'title') ?? ''}”) in batch ${text(d, 'batchId') ?? '?'}`
    case 'leave-batch':
      return `took job ${e.subjectId} (“${text(d, 'title') ?? ''}”) out of batch ${text(d, 'batchId') ?? '?'}`
    case 'edit-placement': {
      const changes = d.changes && typeof d.changes === 'object' ? Object.entries(d.changes as Record<string, { from?: unknown; to?: unknown }>) : []
      const words = changes.map(([k, c]) => `${PLACEMENT_FIELDS[k] ?? k} ${String(c?.from)} → ${String(c?.to)}`)
      return `changed “${text(d, 'title') ?? 'a decal'}” on ${text(d, 'robot') ?? 'a robot'}${words.length ? `: ${words.join(', ')}` : ''}`
    }
    case 'remove-placement':
      return `removed “${text(d, 'title') ?? 'a decal'}” from the ${text(d, 'spot') ?? 'robot'} of ${text(d, 'robot') ?? 'a robot'}: ${text(d, 'reason') ?? ''}`
    case 'apply-spare':
      return `put ${text(d, 'count') ?? '1'} spare “${text(d, 'title') ?? 'decal'}” on the ${text(d, 'spot') ?? 'robot'} of ${text(d, 'robot') ?? 'a robot'}${text(d, 'reason') ? ` (${text(d, 'reason')})` : ''}`
    case 'edit-robot': {
      const from = d.from as { name?: string } | undefined
      return from?.name && from.name !== text(d, 'name') ? `renamed the robot ${from.name} to ${name}` : `changed the season of ${name} to ${text(d, 'season') ?? ''}`
    }
    case 'rename-artwork':
      return `renamed the artwork “${text(d, 'from') ?? subject}” to “${text(d, 'to') ?? ''}”`
    case 'register-film':
      return d.retired ? `retired ${name} when films moved to the polymer register: ${text(d, 'reason') ?? ''}` : `read ${name} (“${text(d, 'typed') ?? ''}”) as ${text(d, 'polymer') ?? '?'} from the polymer register`
    case 'approve-film':
      return `recorded the lab's approval of ${name} (${text(d, 'polymer') ?? ''}), judged on ${text(d, 'safetyDataSheet') ?? 'its safety data sheet'}`
    case 'withdraw-film-approval':
      return `withdrew the lab's approval of ${name}`
    case 'test-film':
      return text(d, 'square')
        ? `recorded a test cut of ${name}: square ${text(d, 'square')} weeded cleanly at ${text(d, 'powerPct')} % and ${text(d, 'speedMmS')} mm/s`
        : `recorded a test cut of ${name}: no square weeded cleanly`
    case 'film-stock':
      return d.kind === 'delivery'
        ? `recorded a delivery of ${text(d, 'sheets') ?? '?'} sheets of ${name} (${text(d, 'onHand') ?? '?'} on hand)`
        : `counted ${text(d, 'sheets') ?? '?'} sheets of ${name} on the shelf`
    case 'add-robot':
      return `added the robot ${name} (${text(d, 'season') ?? ''})`
    case 'add-film':
      return `added ${name} (${text(d, 'polymer') ?? 'film'}) to the film stock`
    case 'update-film':
      return `changed ${name} in the film stock`
    case 'create-mentor':
      return `was made a mentor with the set-up command`
    case 'load-demo':
      return 'loaded the demo program'
    case 'set-work-area': {
      const a = d.laserWorkArea as { widthMm?: number; heightMm?: number } | null | undefined
      return a?.widthMm ? `set the laser's work area to ${a.widthMm} × ${a.heightMm} mm` : 'cleared the laser\'s work area'
    }
    case 'add-rule-profile':
      return `added the rule profile “${text(d, 'name') ?? ''}”${text(d, 'from') ? ` from ${text(d, 'from')}` : ''}`
    case 'edit-rule-profile':
      return `changed the rule profile “${text(d, 'name') ?? ''}”`
    case 'choose-rule-profile':
      return text(d, 'name') ? `chose “${text(d, 'name')}” as the program's number-plate rules` : 'cleared the program\'s number-plate rules'
    case 'generate-plate':
      return `generated the ${text(d, 'role') ?? ''} of plate ${text(d, 'teamNumber') ?? ''} (${text(d, 'colour') ?? ''}) as “${text(d, 'title') ?? subject}”`
    default: {
      const unhandled: never = e.action
      return unhandled
    }
  }
}

/** For actions this screen does not know yet: "<who> <action words> (<subject>)". */
function fallback(e: AuditEntry): string {
  const words = e.action.replace(/([a-z])([A-Z])/g, '$1 $2').toLowerCase().split(/[^a-z0-9]+/).filter(Boolean)
  const subject = e.subjectId ? ` (${e.subjectType} #${e.subjectId})` : ''
  return `${words.join(' ') || 'did something'}${subject}`
}

export function describeAudit(entry: AuditEntry, ctx: AuditContext = {}): AuditSentence {
  const d: Detail = entry.detail && typeof entry.detail === 'object' ? entry.detail : {}
  const actor = entry.actor?.name ?? null
  if (entry.action === 'load-demo') {
    const s = 'The demo program was loaded'
    return { actor, phrase: actor ? 'loaded the demo program' : s, sentence: actor ? `${actor} loaded the demo program` : s }
  }
  const phrase = isAuditAction(entry.action) ? known(entry, d, ctx) : fallback(entry)
  return {
    actor,
    phrase: actor ? phrase : capitalise(phrase),
    sentence: actor ? `${actor} ${phrase}` : `Someone ${phrase}`,
  }
}

/** Detail values for the table's last column. */
export function auditDetailPairs(entry: AuditEntry): [string, string][] {
  const d = entry.detail && typeof entry.detail === 'object' ? entry.detail : {}
  return Object.entries(d)
    .filter(([, v]) => v !== null && v !== undefined && v !== '')
    .map(([k, v]) => [
      k.replace(/([a-z])([A-Z])/g, '$1 $2').replace(/[_-]+/g, ' ').toLowerCase(),
      typeof v === 'object' ? JSON.stringify(v) : String(v),
    ])
}
