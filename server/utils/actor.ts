import type { H3Event } from 'h3'
import type { MemberRole, Role } from '#shared/types/roles'

export interface Actor {
  id: number
  name: string
  email: string
  programId: number
  isMentor: boolean
  /** team id → the actor's role in that team */
  memberships: Map<number, MemberRole>
}

/** The signed-in, active user with roles read fresh from the database; undefined when signed out. */
export async function loadActor(event: H3Event): Promise<Actor | undefined> {
  if (event.context.actor !== undefined) return event.context.actor ?? undefined
  const session = await getUserSession(event)
  const userId = session.user?.id
  let actor: Actor | undefined
  if (typeof userId === 'number') {
    const db = useDb()
    const user = await db.selectFrom('users')
      .leftJoin('mentorship', (j) => j.onRef('mentorship.user_id', '=', 'users.id').onRef('mentorship.program_id', '=', 'users.program_id'))
      .select(['users.id', 'users.name', 'users.email', 'users.program_id', 'users.active', 'mentorship.user_id as mentor_id'])
      .where('users.id', '=', userId)
      .executeTakeFirst()
    if (user?.active) {
      const rows = await db.selectFrom('membership')
        .innerJoin('team', 'team.id', 'membership.team_id')
        .select(['membership.team_id', 'membership.role'])
        .where('membership.user_id', '=', user.id)
        .where('team.program_id', '=', user.program_id)
        .execute()
      actor = {
        id: user.id, name: user.name, email: user.email, programId: user.program_id,
        isMentor: user.mentor_id !== null,
        memberships: new Map(rows.map((r) => [r.team_id, r.role])),
      }
    } else {
      // Deactivated or deleted: the cookie is worthless from now on.
      await clearUserSession(event)
    }
  }
  event.context.actor = actor ?? null
  return actor
}

export async function requireActor(event: H3Event): Promise<Actor> {
  const actor = await loadActor(event)
  if (!actor) throw createError({ statusCode: 401, message: 'Please sign in.' })
  return actor
}

export async function requireMentor(event: H3Event): Promise<Actor> {
  const actor = await requireActor(event)
  if (!actor.isMentor) throw createError({ statusCode: 403, message: 'Only a mentor may do this.' })
  return actor
}

// A designer can do what a student can; an operator's work is separate.
const ROLE_GRANTS: Record<MemberRole, Role[]> = {
  student: ['student'],
  designer: ['designer', 'student'],
  operator: ['operator'],
}

export function actorRoles(actor: Actor): Role[] {
  const roles = new Set<Role>()
  if (actor.isMentor) roles.add('mentor')
  for (const role of actor.memberships.values()) roles.add(role)
  return [...roles]
}

/** Whether the actor may act as `role` in the team (mentors may act as anything). */
export function canActInTeam(actor: Actor, teamId: number, role: Role): boolean {
  if (actor.isMentor) return true
  const held = actor.memberships.get(teamId)
  return !!held && ROLE_GRANTS[held].includes(role)
}

/**
 * The guard for team-scoped work: 404 when the team is not in the actor's program or the
 * actor is not in it (another team's things do not exist for them), 403 when the actor is in
 * the team but their role may not do this.
 */
export async function requireRole(event: H3Event, teamId: number, role: Role): Promise<Actor> {
  const actor = await requireActor(event)
  const team = await useDb().selectFrom('team').select('id')
    .where('id', '=', teamId).where('program_id', '=', actor.programId).executeTakeFirst()
  if (!team || (!actor.isMentor && !actor.memberships.has(teamId))) {
    throw createError({ statusCode: 404, message: 'No such team.' })
  }
  if (!canActInTeam(actor, teamId, role)) {
    throw createError({ statusCode: 403, message: `Only a ${role} or a mentor may do this.` })
  }
  return actor
}

export function homeFor(actor: Actor): string {
  if (actor.isMentor) return '/program'
  const roles = [...actor.memberships.values()]
  if (roles.includes('designer') || roles.includes('student')) return '/studio'
  if (roles.includes('operator')) return '/lab'
  return '/studio'
}

declare module 'h3' {
  interface H3EventContext {
    actor?: Actor | null
  }
}
