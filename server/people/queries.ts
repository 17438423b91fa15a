import { jsonArrayFrom } from 'kysely/helpers/postgres'
import type { Db } from '../platform/db'
import { teamScope, type Actor } from '../policy'

/** Teams the actor may see, with their member counts. */
export function visibleTeams(db: Db, actor: Actor) {
  return db.selectFrom('team')
    .leftJoin('membership', 'membership.team_id', 'team.id')
    .select(['team.id', 'team.name', 'team.number', 'team.colour', 'team.program_id', (eb) => eb.fn.count<number>('membership.user_id').as('member_count')])
    .where(teamScope(actor, 'team.view'))
    .groupBy('team.id')
    .orderBy('team.name')
    .execute()
}

/** One team, if the actor may see it (a scope, not a role check). */
export function teamInScope(db: Db, actor: Actor, id: number) {
  return db.selectFrom('team').select(['team.id', 'team.name', 'team.number', 'team.colour', 'team.id as teamId', 'team.program_id as programId'])
    .where('team.id', '=', id).where(teamScope(actor, 'team.view')).executeTakeFirst()
}

export type TeamRow = NonNullable<Awaited<ReturnType<typeof teamInScope>>>

/** A team of the program by id, whoever asks: for mentors' work that names a team. */
export function teamOfProgram(db: Db, programId: number, id: number) {
  return db.selectFrom('team').select(['id', 'name', 'program_id']).where('id', '=', id).where('program_id', '=', programId).executeTakeFirst()
}

export function teamNameTaken(db: Db, programId: number, name: string, exceptId?: number) {
  let q = db.selectFrom('team').select('id').where('program_id', '=', programId)
    .where((eb) => eb(eb.fn('lower', ['name']), '=', name.toLowerCase()))
  if (exceptId !== undefined) q = q.where('id', '!=', exceptId)
  return q.executeTakeFirst()
}

export function teamMembers(db: Db, teamId: number) {
  return db.selectFrom('membership').innerJoin('users', 'users.id', 'membership.user_id')
    .select(['users.id', 'users.name', 'users.email', 'users.active', 'membership.role'])
    .where('membership.team_id', '=', teamId).orderBy('users.name').execute()
}

export function activeMentors(db: Db, programId: number) {
  return db.selectFrom('mentorship').innerJoin('users', 'users.id', 'mentorship.user_id')
    .select(['users.id', 'users.name', 'users.email'])
    .where('mentorship.program_id', '=', programId).where('users.active', '=', true).orderBy('users.name').execute()
}

/** People of the program (one of them when `userId` is given), with their memberships joined in SQL. */
export function peopleOfProgram(db: Db, programId: number, userId?: number) {
  let q = db.selectFrom('users')
    .leftJoin('mentorship', (j) => j.onRef('mentorship.user_id', '=', 'users.id').onRef('mentorship.program_id', '=', 'users.program_id'))
    .select((eb) => [
      'users.id', 'users.name', 'users.email', 'users.active', 'users.last_sign_in_at', 'mentorship.user_id as mentor_id',
      jsonArrayFrom(eb.selectFrom('membership').innerJoin('team', 'team.id', 'membership.team_id')
        .select(['membership.team_id as teamId', 'team.name as teamName', 'membership.role'])
        .whereRef('membership.user_id', '=', 'users.id').orderBy('team.name')).as('memberships'),
    ])
    .where('users.program_id', '=', programId)
    .orderBy('users.name')
  if (userId !== undefined) q = q.where('users.id', '=', userId)
  return q.execute()
}
