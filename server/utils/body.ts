import type { H3Event } from 'h3'
import { z } from 'zod'

export const JSON_BODY_LIMIT = 64 * 1024
/** Routes that receive files, with their own limits. */
const FILE_ROUTES: [RegExp, number][] = [
  // Room for the multipart envelope around a picture of up to UPLOAD_LIMIT_BYTES.
  [/^\/api\/artworks\/?$/, 25 * 1024 * 1024 + 64 * 1024],
]

export function bodyLimitFor(path: string): number {
  const bare = path.split('?')[0]!
  for (const [pattern, limit] of FILE_ROUTES) if (pattern.test(bare)) return limit
  return JSON_BODY_LIMIT
}

export function formatBytes(n: number): string {
  if (n >= 1024 * 1024) return `${Math.round(n / 1024 / 1024)} MB`
  return `${Math.round(n / 1024)} KB`
}

/** 400 with a field → messages map that a form shows beside each field. */
export function invalidInput(error: z.ZodError): Error {
  const flat = z.flattenError(error)
  const fieldErrors = flat.fieldErrors as Record<string, string[]>
  const first = flat.formErrors[0] ?? Object.values(fieldErrors)[0]?.[0]
  return createError({
    statusCode: 400,
    message: first ? `Please check the form: ${first}` : 'Please check the form.',
    data: { fieldErrors },
  })
}

/** Reads a JSON body (malformed → 400, too large → 413) and validates it (wrong fields → 400). */
export async function readJson<S extends z.ZodType>(event: H3Event, schema: S): Promise<z.output<S>> {
  const raw = await readRawBody(event, 'utf8')
  if (raw && Buffer.byteLength(raw) > JSON_BODY_LIMIT) {
    throw createError({ statusCode: 413, message: `The request is too large (limit ${formatBytes(JSON_BODY_LIMIT)}).` })
  }
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

const idSchema = z.coerce.number().int().positive().max(2 ** 31 - 1)

/** A numeric route parameter; anything else is 404 (there is no such thing). */
export function idParam(event: H3Event, name = 'id'): number {
  const parsed = idSchema.safeParse(getRouterParam(event, name))
  if (!parsed.success) throw createError({ statusCode: 404, message: 'Not found.' })
  return parsed.data
}
