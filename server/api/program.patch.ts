import { programPatchSchema } from '#shared/utils/schemas'

// The mentor records the lab laser's work area (or clears it with null).
export default defineEventHandler(async (event) => {
  const actor = await requireMentor(event)
  const { laserWorkArea } = await readJson(event, programPatchSchema)
  await useDb().transaction().execute(async (trx) => {
    await trx.updateTable('program').set({ laser_work_width_mm: laserWorkArea?.widthMm ?? null, laser_work_height_mm: laserWorkArea?.heightMm ?? null })
      .where('id', '=', actor.programId).execute()
    await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'set-work-area', subjectType: 'program', subjectId: actor.programId, detail: { laserWorkArea } })
  })
  return { laserWorkArea }
})
