import { useDb } from '#server/platform/db'
import { outboxStatus } from '#server/mail/outbox'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'outbox.view')
  return outboxStatus(useDb(), actor)
})
