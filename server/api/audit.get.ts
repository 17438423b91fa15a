import { auditQuerySchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { listAudit } from '#server/history/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'audit.view')
  const query = readQuery(event, auditQuerySchema)
  return listAudit(useDb(), actor, query)
})
