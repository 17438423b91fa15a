import { ROLE_LABELS } from '#shared/types/roles'

// Numbers and dates on every page go through these, in one locale, so the server-rendered
// page and the browser agree on every digit and no page mixes "1,418" with "1 415".
export const LOCALE = 'en-GB'

const numberFormats = new Map<string, Intl.NumberFormat>()

/** A number with at most `digits` decimals (and at least `min`), grouped in thousands. */
export function formatNumber(n: number, digits = 1, min = 0): string {
  const key = `${digits}/${min}`
  let f = numberFormats.get(key)
  if (!f) numberFormats.set(key, f = new Intl.NumberFormat(LOCALE, { maximumFractionDigits: digits, minimumFractionDigits: Math.min(min, digits) }))
  return f.format(n)
}

export type WhenStyle = 'date' | 'minute' | 'second'
const WHEN_OPTIONS: Record<WhenStyle, Intl.DateTimeFormatOptions> = {
  date: { dateStyle: 'medium' },
  minute: { dateStyle: 'medium', timeStyle: 'short' },
  second: { dateStyle: 'medium', timeStyle: 'medium' },
}

/** A moment as people read it here: "2 Dec 2026, 13:16" (or the date alone, or to the second). */
export function formatWhen(at: string | Date, style: WhenStyle = 'minute', timeZone?: string): string {
  return new Intl.DateTimeFormat(LOCALE, { ...WHEN_OPTIONS[style], ...(timeZone ? { timeZone } : {}) }).format(new Date(at))
}

export function roleLabel(role: string | null | undefined): string {
  if (!role) return ''
  return (ROLE_LABELS as Record<string, string>)[role] ?? role
}

/** "1 piece", "2 pieces", "1,200 pieces": the count in the house format and the right form of the word. */
export function plural(n: number, one: string, many = `${one}s`): string {
  return `${formatNumber(n, 0)} ${new Intl.PluralRules(LOCALE).select(n) === 'one' ? one : many}`
}
