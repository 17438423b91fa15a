import { z } from 'zod'

const query = z.object({ teamId: z.coerce.number().int().positive().optional() })

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const parsed = query.safeParse(getQuery(event))
  if (!parsed.success) throw invalidInput(parsed.error)
  return listRobots(actor, parsed.data.teamId)
})
