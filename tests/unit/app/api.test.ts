import { describe, expect, it } from 'vitest'
import { IDEMPOTENCY_HEADER, safeNext, submissionKey } from '../../../app/utils/api'

describe('where to go after signing in', () => {
  it('follows paths of this site', () => {
    expect(safeNext('/robots/3?tab=placements')).toBe('/robots/3?tab=placements')
    expect(safeNext(['/studio', '/other'])).toBe('/studio')
  })

  it('refuses other sites and the sign-in page itself', () => {
    for (const next of ['https://evil.example/', '//evil.example', 'evil.example', '/sign-in?next=/x', '', undefined, 3]) {
      expect(safeNext(next), String(next)).toBeNull()
    }
  })

  it('refuses tabs, newlines, other control characters and backslashes anywhere', () => {
    // A browser's URL parser drops tabs and newlines and reads "\" as "/" (WHATWG URL Standard,
    // basic URL parser): each of these would leave the site.
    for (const next of ['/\t/evil.example', '/\n/evil.example', '/\r/evil.example', '\t', '/\\evil.example', '/a\\b', '/x\u0000', '/x\u007f']) {
      expect(safeNext(next), JSON.stringify(next)).toBeNull()
      if (next.startsWith('/') && !next.includes('\u0000')) {
        const parsed = new URL(next, 'https://decalwright.example')
        if (next.includes('evil')) expect(parsed.host).toBe('evil.example')
      }
    }
  })
})

describe('the Idempotency-Key of a form submission', () => {
  const keyOf = (k: ReturnType<typeof submissionKey>) => k.headers()[IDEMPOTENCY_HEADER]!

  it('stays the same until an answer settles the submission, then is fresh', () => {
    const k = submissionKey()
    const first = keyOf(k)
    expect(first).toMatch(/^[0-9a-f]{32}$/)
    expect(keyOf(k)).toBe(first) // a second click while the first is on its way
    k.settled()
    expect(keyOf(k)).not.toBe(first)
  })

  it('is kept for a retry when no answer came, the server failed, or the first is still being done', () => {
    for (const err of [{ statusCode: 0 }, { statusCode: 503 }, { statusCode: 409 }, new TypeError('fetch failed')]) {
      const k = submissionKey()
      const first = keyOf(k)
      k.settled(err)
      expect(keyOf(k), JSON.stringify(err)).toBe(first)
    }
  })

  it('is fresh after a refusal of what was sent', () => {
    for (const status of [400, 403, 413, 422]) {
      const k = submissionKey()
      const first = keyOf(k)
      k.settled({ statusCode: status })
      expect(keyOf(k)).not.toBe(first)
    }
  })

  it('differs between two forms', () => {
    expect(keyOf(submissionKey())).not.toBe(keyOf(submissionKey()))
  })
})
