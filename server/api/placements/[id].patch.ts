import { placementPatchSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { findPlacement } from '#server/robots/queries'
import { editPlacement } from '#server/robots/service'

export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const placement = authorize(actor, 'placement.edit', await findPlacement(db, actor, idParam(event)), 'No such placement.')
  const patch = await readJson(event, placementPatchSchema)
  return editPlacement(db, actor, placement, patch)
})
