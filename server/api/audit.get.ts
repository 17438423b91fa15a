import { z } from 'zod'

const query = z.object({ limit: z.coerce.number().int().min(1).max(500).default(50) })

export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const parsed = query.safeParse(getQuery(event))
  if (!parsed.success) throw invalidInput(parsed.error)
  return listAudit(actor.programId, parsed.data.limit)
})
