import { polymerQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { listPolymers } from '#server/films/service'

// The polymer register (reference data, the same for every program); ?q= searches it by any common name.
export default defineEventHandler(async (event) => {
  await requireActor(event)
  const { q } = readQuery(event, polymerQuerySchema)
  return listPolymers(useDb(), q)
})
