import { useDb } from '#server/platform/db'
import { inboxMessage, mailFakeInUse } from '#server/mail/outbox'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'mail.view')
  if (!mailFakeInUse()) throw createError({ statusCode: 404, message: 'The local mail fake is not in use.' })
  const message = await inboxMessage(useDb(), actor, idParam(event))
  if (!message) throw createError({ statusCode: 404, message: 'No such message.' })
  return message
})
