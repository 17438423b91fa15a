import type { Me } from '#shared/types/api'

export default defineEventHandler(async (event): Promise<Me> => {
  const actor = await requireActor(event)
  const program = await useDb().selectFrom('program').select(['id', 'name', 'school']).where('id', '=', actor.programId).executeTakeFirstOrThrow()
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
