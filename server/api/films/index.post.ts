import { filmSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const input = await readJson(event, filmSchema)
  setResponseStatus(event, 201)
  return createFilm(event, actor, input)
})
