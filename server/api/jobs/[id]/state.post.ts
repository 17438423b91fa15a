import { jobStateSchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  requireQueueWorker(actor)
  const id = idParam(event)
  const { state } = await readJson(event, jobStateSchema)
  return moveJob(event, actor, id, state)
})
