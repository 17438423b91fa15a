import { listOutbox, outboxDir } from '#server/platform/mail-outbox'

export default defineEventHandler(async (event) => {
  await requireCan(event, 'mail.view')
  const dir = outboxDir()
  if (!dir) throw createError({ statusCode: 404, message: 'The local mail fake is not in use.' })
  return listOutbox(dir)
})
