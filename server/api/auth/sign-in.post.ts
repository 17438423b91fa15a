import { signInSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { signIn } from '#server/auth/service'

export default defineEventHandler(async (event) => {
  const { email, password } = await readJson(event, signInSchema)
  const result = await signIn(useDb(), { email, password, ip: requestIp(event) })
  if (!result.ok) {
    const wait = result.retryAfterSeconds
    setResponseHeader(event, 'Retry-After', wait)
    throw createError({ statusCode: 429, message: `Too many attempts. Try again in ${Math.ceil(wait / 60)} minute${wait > 60 ? 's' : ''}.` })
  }
  return startSession(event, result.userId)
})
