import { labApprovalSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { approveFilm, findFilm } from '#server/films/service'

// A mentor records the lab's approval of an ask-the-lab polymer for this film.
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'film.manage')
  const db = useDb()
  const { id } = await findFilm(db, actor, idParam(event))
  const input = await readJson(event, labApprovalSchema)
  return approveFilm(db, actor, id, input)
})
