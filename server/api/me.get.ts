import type { Me } from '#shared/types/api'

export default defineEventHandler(async (event): Promise<Me> => {
  const actor = await requireActor(event)
  const row = await useDb().selectFrom('program').select(['id', 'name', 'school', 'laser_work_width_mm', 'laser_work_height_mm']).where('id', '=', actor.programId).executeTakeFirstOrThrow()
  const program = {
    id: row.id, name: row.name, school: row.school,
    laserWorkArea: row.laser_work_width_mm && row.laser_work_height_mm ? { widthMm: row.laser_work_width_mm, heightMm: row.laser_work_height_mm } : null,
  }
  const teams = await listTeams(actor)
  return {
    user: { id: actor.id, name: actor.name, email: actor.email },
    program,
    isMentor: actor.isMentor,
    roles: actorRoles(actor),
    teams: teams.filter((t) => t.myRole).map((t) => ({ id: t.id, name: t.name, number: t.number, colour: t.colour, role: t.myRole! })),
    home: homeFor(actor),
    mailFake: !!outboxDir(),
  }
})
