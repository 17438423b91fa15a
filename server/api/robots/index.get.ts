import { robotListQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { listRobots } from '#server/robots/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const query = readQuery(event, robotListQuerySchema)
  return listRobots(useDb(), actor, query)
})
