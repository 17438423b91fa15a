// Reading what a request asks for: validated JSON bodies, query strings and route parameters.
import { createHash } from 'node:crypto'
import { createError, getQuery, getRouterParam, type H3Event } from 'h3'
import { z } from 'zod'
import { UPLOAD_ENVELOPE_BYTES, UPLOAD_LIMIT_BYTES } from '#shared/constants/uploads'
import { formNumber } from '#shared/utils/schemas'
import { readBodyUpTo } from '../platform/body'
import { formatBytes, invalidInput } from '../platform/http'

export const JSON_BODY_LIMIT = 64 * 1024
/** Routes that receive files, with their own limits. */
const FILE_ROUTES: [RegExp, number][] = [
  [/^\/api\/artworks\/?$/, UPLOAD_LIMIT_BYTES + UPLOAD_ENVELOPE_BYTES],
]

export function bodyLimitFor(path: string): number {
  const bare = path.split('?')[0]!
  for (const [pattern, limit] of FILE_ROUTES) if (pattern.test(bare)) return limit
  return JSON_BODY_LIMIT
}

/**
 * Reads a JSON body (malformed → 400, too large → 413 as soon as the limit is passed, however
 * the body is sent) and validates it (wrong fields → 400).
 */
export async function readJson<S extends z.ZodType>(event: H3Event, schema: S): Promise<z.output<S>> {
  const bytes = await readBodyUpTo(event, JSON_BODY_LIMIT, `The request is too large (limit ${formatBytes(JSON_BODY_LIMIT)}).`)
  event.context.bodyFingerprint = createHash('sha256').update(bytes).digest('hex')
  const raw = bytes.toString('utf8')
  let value: unknown
  try {
    value = raw ? JSON.parse(raw) : {}
  } catch {
    throw createError({ statusCode: 400, message: 'The request body is not valid JSON.' })
  }
  const result = schema.safeParse(value)
  if (!result.success) throw invalidInput(result.error)
  return result.data
}

/** The query string, validated (wrong fields → 400). */
export function readQuery<S extends z.ZodType>(event: H3Event, schema: S): z.output<S> {
  const result = schema.safeParse(getQuery(event))
  if (!result.success) throw invalidInput(result.error)
  return result.data
}

const idSchema = formNumber(z.number().int().positive().max(2 ** 31 - 1))

/** A numeric route parameter; anything else is 404 (there is no such thing). */
export function idParam(event: H3Event, name = 'id'): number {
  const parsed = idSchema.safeParse(getRouterParam(event, name))
  if (!parsed.success) throw createError({ statusCode: 404, message: 'Not found.' })
  return parsed.data
}

/** A one-time link's token from the route. */
export function tokenParam(event: H3Event): string {
  return getRouterParam(event, 'token') ?? ''
}
