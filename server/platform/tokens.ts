import { createHash, randomBytes } from 'node:crypto'

// One-time links carry a random token; only its SHA-256 is stored, so a copy of the
// database cannot be used to sign in.
export function newToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url')
  return { token, hash: hashToken(token) }
}

export function hashToken(token: string): string {
  return createHash('sha256').update(token).digest('hex')
}

export const INVITATION_TTL_MS = 7 * 24 * 60 * 60 * 1000
export const RESET_TTL_MS = 60 * 60 * 1000
export const WELCOME_TTL_MS = 3 * 24 * 60 * 60 * 1000
