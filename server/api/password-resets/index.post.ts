import { resetRequestSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { requestReset } from '#server/auth/service'

export default defineEventHandler(async (event) => {
  const { email } = await readJson(event, resetRequestSchema)
  await requestReset(useDb(), email, requestIp(event))
  setResponseStatus(event, 202)
  return { message: 'If an account exists for that address, we have sent a link. It works once, within an hour.' }
})
