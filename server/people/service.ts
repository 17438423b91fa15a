// Teams and the people in them.
import { createError } from 'h3'
import type { Person, TeamDetail, TeamSummary } from '#shared/types/api'
import type { MemberRole } from '#shared/types/roles'
import { inTransaction, type Db } from '../platform/db'
import { endUserSessions } from '../auth/sessions'
import { fieldError } from '../platform/http'
import { flags, type Actor } from '../policy'
import { audit, by } from '../history/service'
import { listInvitations } from './invitations'
import { activeMentors, peopleOfProgram, teamMembers, teamInScope, teamNameTaken, teamOfProgram, visibleTeams, type TeamRow } from './queries'

// ---------- teams ----------

export async function listTeams(db: Db, actor: Actor): Promise<TeamSummary[]> {
  const rows = await visibleTeams(db, actor)
  return rows.map((r) => ({
    id: r.id, name: r.name, number: r.number, colour: r.colour, memberCount: Number(r.member_count),
    myRole: actor.memberships.get(r.id) ?? (actor.isMentor ? 'mentor' : null),
  }))
}

const NAME_TAKEN = 'There is a team of that name already.'

export async function createTeam(db: Db, actor: Actor, input: { name: string; number: string | null; colour: string }): Promise<TeamSummary> {
  return inTransaction(db, async (trx) => {
    if (await teamNameTaken(trx, actor.programId, input.name)) throw fieldError(409, NAME_TAKEN, 'name')
    const team = await trx.insertInto('team').values({ program_id: actor.programId, ...input }).returningAll().executeTakeFirstOrThrow()
    await audit(trx, { ...by(actor), action: 'create-team', subject: 'team', subjectId: team.id, detail: { name: team.name } })
    return { id: team.id, name: team.name, number: team.number, colour: team.colour, memberCount: 0, myRole: 'mentor' }
  })
}

/** Changes a team's name, number or colour; 404 for a team of another program (the SQL where). */
export async function updateTeam(db: Db, actor: Actor, teamId: number, input: { name?: string; number?: string | null; colour?: string }): Promise<TeamDetail> {
  const patch = Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined)) as typeof input
  return inTransaction(db, async (trx) => {
    if (Object.keys(patch).length) {
      if (patch.name && await teamNameTaken(trx, actor.programId, patch.name, teamId)) throw fieldError(409, NAME_TAKEN, 'name')
      const r = await trx.updateTable('team').set(patch).where('id', '=', teamId).where('program_id', '=', actor.programId).executeTakeFirst()
      if (r.numUpdatedRows) await audit(trx, { ...by(actor), action: 'update-team', subject: 'team', subjectId: teamId, detail: patch })
    }
    const team = await teamInScope(trx, actor, teamId)
    if (!team) throw createError({ statusCode: 404, message: 'No such team.' })
    return teamDetail(trx, actor, team)
  })
}

/** The team's page. The caller has found the team in the actor's scope. */
export async function teamDetail(db: Db, actor: Actor, team: TeamRow): Promise<TeamDetail> {
  const [members, mentors] = await Promise.all([teamMembers(db, team.id), activeMentors(db, actor.programId)])
  const can = flags(actor, ['team.manage', 'people.manage'], team)
  // Addresses are for those who manage people; everyone else sees names.
  const email = (address: string) => (can['people.manage'] ? address : null)
  return {
    team: { id: team.id, name: team.name, number: team.number, colour: team.colour },
    members: members.map((m) => ({ userId: m.id, name: m.name, email: email(m.email), role: m.role, active: m.active })),
    mentors: mentors.map((m) => ({ userId: m.id, name: m.name, email: email(m.email) })),
    invitations: can['people.manage'] ? await listInvitations(db, actor, team.id) : [],
    can,
  }
}

// ---------- people ----------

function toPerson(u: Awaited<ReturnType<typeof peopleOfProgram>>[number]): Person {
  return {
    id: u.id, name: u.name, email: u.email, active: u.active, isMentor: u.mentor_id !== null,
    lastSignInAt: u.last_sign_in_at ? new Date(u.last_sign_in_at).toISOString() : null,
    memberships: u.memberships,
  }
}

export async function listPeople(db: Db, actor: Actor): Promise<Person[]> {
  return (await peopleOfProgram(db, actor.programId)).map(toPerson)
}

/** One person of the actor's program; 404 for anyone else. */
export async function findPerson(db: Db, actor: Actor, userId: number): Promise<Person> {
  const [row] = await peopleOfProgram(db, actor.programId, userId)
  if (!row) throw createError({ statusCode: 404, message: 'No such person.' })
  return toPerson(row)
}

/** Ends every session of a person of the program (a lost laptop, a shared computer left signed in). */
export async function signOutEverywhere(db: Db, actor: Actor, userId: number): Promise<void> {
  await inTransaction(db, async (trx) => {
    const person = await findPerson(trx, actor, userId)
    const sessions = await endUserSessions(trx, userId, 'signed-out-everywhere')
    await audit(trx, { ...by(actor), action: 'sign-out-everywhere', subject: 'user', subjectId: userId, detail: { name: person.name, sessions } })
  })
}

export async function updatePerson(db: Db, actor: Actor, userId: number, patch: { name?: string; active?: boolean; mentor?: boolean }): Promise<Person> {
  if (userId === actor.id && (patch.active === false || patch.mentor === false)) {
    throw createError({ statusCode: 409, message: 'You cannot deactivate yourself or give up your own mentorship; ask another mentor.' })
  }
  return inTransaction(db, async (trx) => {
    const before = await findPerson(trx, actor, userId)
    if (patch.name !== undefined && patch.name !== before.name) {
      await trx.updateTable('users').set({ name: patch.name }).where('id', '=', userId).execute()
      await audit(trx, { ...by(actor), action: 'rename-person', subject: 'user', subjectId: userId, detail: { from: before.name, to: patch.name } })
    }
    if (patch.active !== undefined && patch.active !== before.active) {
      await trx.updateTable('users').set({ active: patch.active }).where('id', '=', userId).execute()
      if (!patch.active) {
        await trx.updateTable('password_reset').set({ used_at: new Date() }).where('user_id', '=', userId).where('used_at', 'is', null).execute()
        await endUserSessions(trx, userId, 'deactivated')
      }
      await audit(trx, { ...by(actor), action: patch.active ? 'reactivate' : 'deactivate', subject: 'user', subjectId: userId, detail: { name: before.name } })
    }
    if (patch.mentor !== undefined && patch.mentor !== before.isMentor) {
      if (patch.mentor) await trx.insertInto('mentorship').values({ user_id: userId, program_id: actor.programId }).execute()
      else await trx.deleteFrom('mentorship').where('user_id', '=', userId).where('program_id', '=', actor.programId).execute()
      await audit(trx, { ...by(actor), action: 'change-role', subject: 'user', subjectId: userId, detail: { name: before.name, mentor: patch.mentor } })
    }
    return findPerson(trx, actor, userId)
  })
}

/** Puts a person in a team with a role, changes the role, or (role null) takes them out. */
export async function setMembership(db: Db, actor: Actor, userId: number, teamId: number, role: MemberRole | null): Promise<Person> {
  return inTransaction(db, async (trx) => {
    const person = await findPerson(trx, actor, userId)
    const team = await teamOfProgram(trx, actor.programId, teamId)
    if (!team) throw createError({ statusCode: 404, message: 'No such team.' })
    const before = person.memberships.find((m) => m.teamId === teamId)?.role ?? null
    if (before === role) return person
    if (role === null) await trx.deleteFrom('membership').where('user_id', '=', userId).where('team_id', '=', teamId).execute()
    else {
      await trx.insertInto('membership').values({ user_id: userId, team_id: teamId, role })
        .onConflict((oc) => oc.columns(['user_id', 'team_id']).doUpdateSet({ role })).execute()
    }
    await audit(trx, { ...by(actor), action: 'change-role', subject: 'user', subjectId: userId, detail: { name: person.name, team: team.name, from: before, to: role } })
    return findPerson(trx, actor, userId)
  })
}

// ---------- the program ----------

/** The mentor records the lab laser's work area (or clears it with null). */
export async function setLaserWorkArea(db: Db, actor: Actor, laserWorkArea: { widthMm: number; heightMm: number } | null): Promise<{ laserWorkArea: { widthMm: number; heightMm: number } | null }> {
  await inTransaction(db, async (trx) => {
    await trx.updateTable('program').set({ laser_work_width_mm: laserWorkArea?.widthMm ?? null, laser_work_height_mm: laserWorkArea?.heightMm ?? null })
      .where('id', '=', actor.programId).execute()
    await audit(trx, { ...by(actor), action: 'set-work-area', subject: 'program', subjectId: actor.programId, detail: { laserWorkArea } })
  })
  return { laserWorkArea }
}
