import { useDb } from '#server/platform/db'
import { withdrawApproval } from '#server/films/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'film.manage')
  return withdrawApproval(useDb(), actor, idParam(event))
})
