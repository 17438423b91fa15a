import { resetSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const { password } = await readJson(event, resetSchema)
  return completeReset(event, getRouterParam(event, 'token') ?? '', password)
})
