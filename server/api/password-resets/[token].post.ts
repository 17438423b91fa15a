import { resetSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { completeReset } from '#server/auth/service'

export default defineEventHandler(async (event) => {
  const { password } = await readJson(event, resetSchema)
  const userId = await completeReset(useDb(), tokenParam(event), password, requestIp(event))
  return startSession(event, userId)
})
