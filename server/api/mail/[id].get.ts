import { outboxDir, readOutboxMessage } from '#server/platform/mail-outbox'

export default defineEventHandler(async (event) => {
  await requireCan(event, 'mail.view')
  const dir = outboxDir()
  if (!dir) throw createError({ statusCode: 404, message: 'The local mail fake is not in use.' })
  const message = await readOutboxMessage(dir, getRouterParam(event, 'id') ?? '')
  if (!message) throw createError({ statusCode: 404, message: 'No such message.' })
  return message
})
