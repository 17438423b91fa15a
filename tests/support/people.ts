import { hashPassword } from '../../server/platform/passwords'
import type { MemberRole } from '../../shared/types/roles'
import { uniqueEmail } from './client'
import { testDb } from './db'

/** A new person in the demo program (optionally on a demo team), made straight in the database. */
export async function makeUser(name: string, o: { password?: string; team?: string; role?: MemberRole } = {}) {
  const db = testDb()
  const password = o.password ?? 'a-long-enough-password'
  const program = await db.selectFrom('program').select('id').where('name', '=', 'Harbourline Robotics').executeTakeFirstOrThrow()
  const email = uniqueEmail(name.toLowerCase().replace(/\W+/g, '.'))
  const user = await db.insertInto('users').values({ program_id: program.id, email, name, password_hash: await hashPassword(password) }).returning('id').executeTakeFirstOrThrow()
  if (o.team) {
    const team = await db.selectFrom('team').select('id').where('name', '=', o.team).executeTakeFirstOrThrow()
    await db.insertInto('membership').values({ user_id: user.id, team_id: team.id, role: o.role ?? 'student' }).execute()
  }
  return { id: user.id, email, password, name }
}
