import { robotSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const input = await readJson(event, robotSchema)
  await requireRole(event, input.teamId, 'designer')
  setResponseStatus(event, 201)
  return createRobot(event, actor, input)
})
