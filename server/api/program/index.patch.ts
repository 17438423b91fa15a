import { programPatchSchema } from '#shared/utils/schemas'
import { useDb } from '#server/platform/db'
import { setLaserWorkArea } from '#server/people/service'

// The mentor records the lab laser's work area (or clears it with null).
export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'program.manage')
  const { laserWorkArea } = await readJson(event, programPatchSchema)
  return setLaserWorkArea(useDb(), actor, laserWorkArea)
})
