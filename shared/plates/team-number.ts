// A team number as it goes on a plate: digits, maybe one capital letter after them.
import { z } from 'zod'

/** Longest number of digits accepted (the longest team numbers in use have five or six, common practice). */
export const TEAM_NUMBER_MAX_DIGITS = 6

const PATTERN = new RegExp(`^[0-9]{1,${TEAM_NUMBER_MAX_DIGITS}}[A-Z]?$`)

/** Trimmed and upper-cased ("1234a" → "1234A"); validated as digits and an optional letter. */
export const teamNumberSchema = z.string().trim().toUpperCase().regex(PATTERN, {
  message: `Enter the team number: 1 to ${TEAM_NUMBER_MAX_DIGITS} digits, maybe followed by one letter.`,
})

export function normaliseTeamNumber(input: string): string {
  return teamNumberSchema.parse(input)
}
