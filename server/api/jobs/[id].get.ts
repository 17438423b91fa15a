import { cutSheetQuerySchema } from '#shared/utils/schemas'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const id = idParam(event)
  const parsed = cutSheetQuerySchema.safeParse(getQuery(event))
  if (!parsed.success) throw invalidInput(parsed.error)
  return jobDetail(actor, id, parsed.data)
})
