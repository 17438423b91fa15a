// Answers in HTTP terms that services and route helpers share.
import { createError } from 'h3'
import { z } from 'zod'

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

/** A refusal about one field of a form, for what only the database can tell (a team of another program…). */
export function fieldError(statusCode: number, message: string, field: string, fieldMessage = message): Error {
  return createError({ statusCode, message, data: { fieldErrors: { [field]: [fieldMessage] } } })
}

export function notFound(message = 'Not found.'): Error {
  return createError({ statusCode: 404, message })
}
