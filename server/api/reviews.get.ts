import { reviewQueueQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { reviewQueue } from '#server/review/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'revision.review')
  const query = readQuery(event, reviewQueueQuerySchema)
  return reviewQueue(useDb(), actor, query)
})
