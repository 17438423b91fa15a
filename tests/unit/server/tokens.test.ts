import { describe, expect, it } from 'vitest'
import { hashToken, newToken } from '../../../server/platform/tokens'

describe('one-time link tokens', () => {
  it('stores SHA-256 of the token', () => {
    // FIPS 180-2, Appendix B.1: SHA-256("abc")
    expect(hashToken('abc')).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad')
  })

  it('makes long random tokens whose hash matches', () => {
    const a = newToken()
    const b = newToken()
    expect(a.token).not.toBe(b.token)
    // 32 random bytes in base64url: 43 characters, 256 bits.
    expect(a.token).toMatch(/^[A-Za-z0-9_-]{43}$/)
    expect(a.hash).toBe(hashToken(a.token))
  })
})
