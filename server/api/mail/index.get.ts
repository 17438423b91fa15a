import { useDb } from '#server/platform/db'
import { listInbox, mailFakeInUse } from '#server/mail/outbox'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'mail.view')
  if (!mailFakeInUse()) throw createError({ statusCode: 404, message: 'The local mail fake is not in use.' })
  return listInbox(useDb(), actor)
})
