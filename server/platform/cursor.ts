// Keyset pagination: a page ends with an opaque cursor naming its last row's sort key; the
// next page starts after it, so pages stay stable while rows are added and cost the same
// however deep one goes.
import { createError } from 'h3'
import type { z } from 'zod'

export function encodeCursor(key: unknown): string {
  return Buffer.from(JSON.stringify(key), 'utf8').toString('base64url')
}

/** The sort key a cursor carries, checked against `schema`; 400 for anything else. */
export function decodeCursor<S extends z.ZodType>(cursor: string | undefined, schema: S): z.output<S> | undefined {
  if (cursor === undefined) return undefined
  let value: unknown
  try {
    value = JSON.parse(Buffer.from(cursor, 'base64url').toString('utf8'))
  } catch {
    value = undefined
  }
  const parsed = schema.safeParse(value)
  if (!parsed.success) throw createError({ statusCode: 400, message: 'This page link is not valid any more. Start again from the first page.' })
  return parsed.data
}

/** Rows fetched with limit + 1: the extra one only says whether another page follows. */
export function pageOf<R, T>(rows: R[], limit: number, view: (row: R) => T, keyOf: (row: R) => unknown): { items: T[]; nextCursor: string | null } {
  const more = rows.length > limit
  const shown = more ? rows.slice(0, limit) : rows
  return { items: shown.map(view), nextCursor: more ? encodeCursor(keyOf(shown[shown.length - 1]!)) : null }
}
