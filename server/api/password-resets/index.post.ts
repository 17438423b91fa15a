import { resetRequestSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { requestReset } from '#server/auth/service'

export default defineEventHandler(async (event) => {
  const { email } = await readJson(event, resetRequestSchema)
  const result = await requestReset(useDb(), email, requestIp(event))
  if (!result.ok) {
    setResponseHeader(event, 'Retry-After', result.retryAfterSeconds)
    throw createError({ statusCode: 429, message: `Too many requests from here. Try again in ${Math.ceil(result.retryAfterSeconds / 60)} minutes.` })
  }
  setResponseStatus(event, 202)
  return { message: 'If an account exists for that address, we have sent a link. It works once, within an hour.' }
})
