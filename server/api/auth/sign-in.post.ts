import { signInSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const { email, password } = await readJson(event, signInSchema)
  return signIn(event, email, password)
})
