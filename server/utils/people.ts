import type { H3Event } from 'h3'
import type { Person, TeamDetail, TeamSummary } from '#shared/types/api'
import type { MemberRole } from '#shared/types/roles'
import type { Actor } from './actor'

// ---------- teams ----------

export async function listTeams(actor: Actor): Promise<TeamSummary[]> {
  const db = useDb()
  let q = db.selectFrom('team')
    .leftJoin('membership', 'membership.team_id', 'team.id')
    .select(['team.id', 'team.name', 'team.number', 'team.colour', (eb) => eb.fn.count<number>('membership.user_id').as('member_count')])
    .where('team.program_id', '=', actor.programId)
    .groupBy('team.id')
    .orderBy('team.name')
  if (!actor.isMentor) q = q.where('team.id', 'in', [0, ...actor.memberships.keys()])
  const rows = await q.execute()
  return rows.map((r) => ({
    id: r.id, name: r.name, number: r.number, colour: r.colour, memberCount: Number(r.member_count),
    myRole: actor.memberships.get(r.id) ?? (actor.isMentor ? 'mentor' : null),
  }))
}

export async function createTeam(event: H3Event, actor: Actor, input: { name: string; number: string | null; colour: string }): Promise<TeamSummary> {
  return useDb().transaction().execute(async (trx) => {
    const clash = await trx.selectFrom('team').select('id').where('program_id', '=', actor.programId)
      .where((eb) => eb(eb.fn('lower', ['name']), '=', input.name.toLowerCase())).executeTakeFirst()
    if (clash) throw createError({ statusCode: 409, message: 'There is a team of that name already.', data: { fieldErrors: { name: ['There is a team of that name already.'] } } })
    const team = await trx.insertInto('team').values({ program_id: actor.programId, ...input }).returningAll().executeTakeFirstOrThrow()
    await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'create-team', subjectType: 'team', subjectId: team.id, detail: { name: team.name } })
    return { id: team.id, name: team.name, number: team.number, colour: team.colour, memberCount: 0, myRole: 'mentor' }
  })
}

export async function updateTeam(event: H3Event, actor: Actor, teamId: number, input: { name?: string; number?: string | null; colour?: string }): Promise<void> {
  const patch = Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined)) as typeof input
  if (!Object.keys(patch).length) return
  await useDb().transaction().execute(async (trx) => {
    if (patch.name) {
      const clash = await trx.selectFrom('team').select('id').where('program_id', '=', actor.programId).where('id', '!=', teamId)
        .where((eb) => eb(eb.fn('lower', ['name']), '=', patch.name!.toLowerCase())).executeTakeFirst()
      if (clash) throw createError({ statusCode: 409, message: 'There is a team of that name already.', data: { fieldErrors: { name: ['There is a team of that name already.'] } } })
    }
    const r = await trx.updateTable('team').set(patch).where('id', '=', teamId).where('program_id', '=', actor.programId).executeTakeFirst()
    if (!r.numUpdatedRows) throw createError({ statusCode: 404, message: 'No such team.' })
    await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'update-team', subjectType: 'team', subjectId: teamId, detail: patch })
  })
}

export async function teamDetail(actor: Actor, teamId: number): Promise<TeamDetail> {
  const db = useDb()
  const team = await db.selectFrom('team').select(['id', 'name', 'number', 'colour'])
    .where('id', '=', teamId).where('program_id', '=', actor.programId).executeTakeFirst()
  if (!team) throw createError({ statusCode: 404, message: 'No such team.' })
  const [members, mentors] = await Promise.all([
    db.selectFrom('membership').innerJoin('users', 'users.id', 'membership.user_id')
      .select(['users.id', 'users.name', 'users.email', 'users.active', 'membership.role'])
      .where('membership.team_id', '=', teamId).orderBy('users.name').execute(),
    db.selectFrom('mentorship').innerJoin('users', 'users.id', 'mentorship.user_id')
      .select(['users.id', 'users.name', 'users.email'])
      .where('mentorship.program_id', '=', actor.programId).where('users.active', '=', true).orderBy('users.name').execute(),
  ])
  return {
    team,
    members: members.map((m) => ({ userId: m.id, name: m.name, email: m.email, role: m.role, active: m.active })),
    mentors: mentors.map((m) => ({ userId: m.id, name: m.name, email: m.email })),
    invitations: actor.isMentor ? await listInvitations(actor.programId, teamId) : [],
  }
}

// ---------- people ----------

export async function listPeople(programId: number, userId?: number): Promise<Person[]> {
  const db = useDb()
  let q = db.selectFrom('users')
    .leftJoin('mentorship', (j) => j.onRef('mentorship.user_id', '=', 'users.id').onRef('mentorship.program_id', '=', 'users.program_id'))
    .select(['users.id', 'users.name', 'users.email', 'users.active', 'users.last_sign_in_at', 'mentorship.user_id as mentor_id'])
    .where('users.program_id', '=', programId)
    .orderBy('users.name')
  if (userId) q = q.where('users.id', '=', userId)
  const users = await q.execute()
  if (!users.length) return []
  const memberships = await db.selectFrom('membership').innerJoin('team', 'team.id', 'membership.team_id')
    .select(['membership.user_id', 'membership.team_id', 'membership.role', 'team.name as team_name'])
    .where('membership.user_id', 'in', users.map((u) => u.id)).orderBy('team.name').execute()
  return users.map((u) => ({
    id: u.id, name: u.name, email: u.email, active: u.active, isMentor: u.mentor_id !== null,
    lastSignInAt: u.last_sign_in_at ? new Date(u.last_sign_in_at).toISOString() : null,
    memberships: memberships.filter((m) => m.user_id === u.id).map((m) => ({ teamId: m.team_id, teamName: m.team_name, role: m.role })),
  }))
}

async function personOr404(programId: number, userId: number): Promise<Person> {
  const [person] = await listPeople(programId, userId)
  if (!person) throw createError({ statusCode: 404, message: 'No such person.' })
  return person
}

export async function updatePerson(event: H3Event, actor: Actor, userId: number, patch: { name?: string; active?: boolean; mentor?: boolean }): Promise<Person> {
  const before = await personOr404(actor.programId, userId)
  if (userId === actor.id && (patch.active === false || patch.mentor === false)) {
    throw createError({ statusCode: 409, message: 'You cannot deactivate yourself or give up your own mentorship; ask another mentor.' })
  }
  await useDb().transaction().execute(async (trx) => {
    if (patch.name !== undefined && patch.name !== before.name) {
      await trx.updateTable('users').set({ name: patch.name }).where('id', '=', userId).execute()
      await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'rename-person', subjectType: 'user', subjectId: userId, detail: { from: before.name, to: patch.name } })
    }
    if (patch.active !== undefined && patch.active !== before.active) {
      await trx.updateTable('users').set({ active: patch.active }).where('id', '=', userId).execute()
      if (!patch.active) await trx.updateTable('password_reset').set({ used_at: new Date() }).where('user_id', '=', userId).where('used_at', 'is', null).execute()
      await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: patch.active ? 'reactivate' : 'deactivate', subjectType: 'user', subjectId: userId, detail: { name: before.name } })
    }
    if (patch.mentor !== undefined && patch.mentor !== before.isMentor) {
      if (patch.mentor) await trx.insertInto('mentorship').values({ user_id: userId, program_id: actor.programId }).execute()
      else await trx.deleteFrom('mentorship').where('user_id', '=', userId).where('program_id', '=', actor.programId).execute()
      await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'change-role', subjectType: 'user', subjectId: userId, detail: { name: before.name, mentor: patch.mentor } })
    }
  })
  return personOr404(actor.programId, userId)
}

export async function setMembership(event: H3Event, actor: Actor, userId: number, teamId: number, role: MemberRole | null): Promise<Person> {
  const person = await personOr404(actor.programId, userId)
  const team = await useDb().selectFrom('team').select(['id', 'name']).where('id', '=', teamId).where('program_id', '=', actor.programId).executeTakeFirst()
  if (!team) throw createError({ statusCode: 404, message: 'No such team.' })
  const before = person.memberships.find((m) => m.teamId === teamId)?.role ?? null
  if (before === role) return person
  await useDb().transaction().execute(async (trx) => {
    if (role === null) await trx.deleteFrom('membership').where('user_id', '=', userId).where('team_id', '=', teamId).execute()
    else await trx.insertInto('membership').values({ user_id: userId, team_id: teamId, role })
      .onConflict((oc) => oc.columns(['user_id', 'team_id']).doUpdateSet({ role })).execute()
    await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'change-role', subjectType: 'user', subjectId: userId, detail: { name: person.name, team: team.name, from: before, to: role } })
  })
  return personOr404(actor.programId, userId)
}

export async function listAudit(programId: number, limit: number) {
  const rows = await useDb().selectFrom('audit_event').leftJoin('users', 'users.id', 'audit_event.actor_id')
    .select(['audit_event.id', 'audit_event.at', 'audit_event.action', 'audit_event.subject_type', 'audit_event.subject_id', 'audit_event.detail', 'users.id as actor_id', 'users.name as actor_name'])
    .where('audit_event.program_id', '=', programId)
    .orderBy('audit_event.id', 'desc').limit(limit).execute()
  return rows.map((r) => ({
    id: r.id, at: new Date(r.at).toISOString(), action: r.action,
    actor: r.actor_id ? { id: r.actor_id, name: r.actor_name! } : null,
    subjectType: r.subject_type, subjectId: r.subject_id, detail: r.detail,
  }))
}
