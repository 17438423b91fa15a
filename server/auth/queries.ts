import { sql } from 'kysely'
import type { Db } from '../platform/db'

/** The user with their mentorship and memberships (of their own program's teams), in one query. */
export function actorRow(db: Db, userId: number) {
  return db.selectFrom('users')
    .leftJoin('mentorship', (j) => j.onRef('mentorship.user_id', '=', 'users.id').onRef('mentorship.program_id', '=', 'users.program_id'))
    .select((eb) => [
      'users.id', 'users.name', 'users.email', 'users.program_id', 'users.active', 'mentorship.user_id as mentor_id',
      eb.fn.coalesce(
        eb.selectFrom('membership').innerJoin('team', 'team.id', 'membership.team_id')
          .select(sql<[number, 'student' | 'designer' | 'operator'][]>`json_agg(json_build_array(membership.team_id, membership.role))`.as('list'))
          .whereRef('membership.user_id', '=', 'users.id').whereRef('team.program_id', '=', 'users.program_id'),
        sql<[number, 'student' | 'designer' | 'operator'][]>`'[]'::json`,
      ).as('memberships'),
    ])
    .where('users.id', '=', userId)
    .executeTakeFirst()
}

export function userByEmail(db: Db, email: string) {
  return db.selectFrom('users').selectAll().where('email', '=', email).executeTakeFirst()
}
