import { resetRequestSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const { email } = await readJson(event, resetRequestSchema)
  await requestReset(event, email)
  setResponseStatus(event, 202)
  return { message: 'If an account exists for that address, we have sent a link. It works once, within an hour.' }
})
