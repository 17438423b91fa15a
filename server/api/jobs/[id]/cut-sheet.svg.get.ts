import { cutSheetQuerySchema } from '#shared/utils/schemas'

// One sheet per file: ?sheet=N picks it (default 1); the job page lists how many there are.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const id = idParam(event)
  const parsed = cutSheetQuerySchema.safeParse(getQuery(event))
  if (!parsed.success) throw invalidInput(parsed.error)
  return sendCutSheet(event, await cutSheetFiles(actor, id, parsed.data, 'svg'), 'svg', parsed.data.sheet ?? 1)
})
