import { ARTWORK_STATUS_LABELS, type ArtworkStatus } from '#shared/types/artworks'
import { JOB_STATE_LABELS, type JobState } from '#shared/types/robots'

import { formatNumber } from './format'

// Words and numbers for the artwork screens, through the one formatter in ./format.

/** How an artwork's (or a revision's) status looks: always a word with an icon. */
export function artworkStatusLook(status: ArtworkStatus | string): { kind: 'draft' | 'waiting' | 'ok' | 'caution' | 'off'; label: string } {
  const label = (ARTWORK_STATUS_LABELS as Record<string, string>)[status] ?? status
  switch (status) {
    case 'draft': return { kind: 'draft', label }
    case 'in-review': return { kind: 'waiting', label }
    case 'approved': return { kind: 'ok', label }
    case 'sent-back': return { kind: 'caution', label }
    default: return { kind: 'off', label }
  }
}

/** How a job's state looks: a word with an icon. */
export function jobStateLook(state: JobState): { kind: 'waiting' | 'ok' | 'off' | 'danger'; label: string } {
  const kind = state === 'queued' ? 'waiting' : state === 'cancelled' ? 'off' : state === 'failed' ? 'danger' : 'ok'
  return { kind, label: JOB_STATE_LABELS[state] }
}

export function revisionLabel(n: number): string {
  return `r${n}`
}

/** Millimetres to a sensible precision: 0.01 mm below 10 mm, 0.1 mm above. */
export function formatMm(mm: number): string {
  return `${formatNumber(mm, Math.abs(mm) < 10 ? 2 : 1)} mm`
}

export function formatSizeMm(widthMm: number, heightMm: number): string {
  return `${formatNumber(widthMm, 1)} × ${formatNumber(heightMm, 1)} mm`
}

export function formatAreaMm2(mm2: number): string {
  return `${formatNumber(mm2, mm2 < 10 ? 2 : 0)} mm²`
}

/** A cut length in mm, and in metres as well once it passes a metre. */
export function formatCutLength(mm: number): string {
  const inMm = `${formatNumber(mm, 0)} mm`
  return mm > 1000 ? `${inMm} (${formatNumber(mm / 1000, 2)} m)` : inMm
}

/** A 0…1 ratio as a percentage with one decimal: 0.98765 → "98.8 %". */
export function formatPercent(ratio: number): string {
  return `${formatNumber(ratio * 100, 1, 1)} %`
}

export function formatMs(ms: number): string {
  return ms >= 1000 ? `${formatNumber(ms / 1000, 2)} s` : `${formatNumber(ms, 0)} ms`
}

export function fileSize(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${formatNumber(bytes / 1024 / 1024, 1)} MB`
  if (bytes >= 1024) return `${formatNumber(bytes / 1024, 0)} KB`
  return `${bytes} bytes`
}

/** Team options for forms and filters, in name order. */
export function byName<T extends { name: string }>(list: readonly T[]): T[] {
  return [...list].sort((a, b) => a.name.localeCompare(b.name))
}
