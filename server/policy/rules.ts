// Who may do what: the one place that knows the role ladder. Routes ask it before they act,
// the SQL scopes (./scopes.ts) are built from it, and its answers go to the pages as `can`
// flags. Plain code, free of Nuxt and of the database.
//
// - A mentor runs the whole program: every action on everything in it.
// - In a team, roles form a ladder, student < designer: a designer may do what a student
//   may. An operator's work is separate; operators work the whole program's cut queue.
// - Another program's things do not exist for anyone (404), nor, for a member, another
//   team's things (404). A role that may not act gets 403.
import type { MemberRole, Role } from '#shared/types/roles'
import { ACTIONS, isProgramAction, TEAM_ACTIONS, type Action, type Can, type ProgramAction, type TeamAction } from '#shared/types/policy'

export interface Actor {
  id: number
  name: string
  email: string
  programId: number
  isMentor: boolean
  /** team id → the actor's role in that team (teams of the actor's own program only) */
  memberships: ReadonlyMap<number, MemberRole>
  /** Where the request came from, for the history. */
  ip: string | null
}

/** Something that belongs to one team of one program. */
export interface TeamSubject {
  teamId: number
  programId: number
}

/** A designer can do what a student can; an operator's work is separate. */
export const ROLE_GRANTS: Record<MemberRole, readonly MemberRole[]> = {
  student: ['student'],
  designer: ['designer', 'student'],
  operator: ['operator'],
}

/** The least role in a team that may do each team action ('member': any role at all). */
const TEAM_RULES: Record<TeamAction, MemberRole | 'member'> = {
  'team.view': 'member',
  'team.members': 'student',
  'artwork.view': 'member',
  'artwork.upload': 'student',
  'artwork.revise': 'designer',
  'revision.submit': 'student',
  'robot.view': 'member',
  'placement.create': 'designer',
  'placement.edit': 'designer',
  'placement.reprint': 'member',
  'robot.edit': 'designer',
  'job.view': 'member',
}

/** Program work beyond a mentor's: the cut queue, which every operator works, and one's own mail, which everyone reads. */
const PROGRAM_RULES: Record<ProgramAction, 'mentor' | 'operator' | 'anyone'> = {
  'team.manage': 'mentor',
  'people.manage': 'mentor',
  'film.manage': 'mentor',
  'robot.create': 'mentor',
  'revision.review': 'mentor',
  'audit.view': 'mentor',
  'mail.view': 'anyone',
  'outbox.view': 'mentor',
  'program.manage': 'mentor',
  'queue.work': 'operator',
  'film.test': 'operator',
}

function holdsAnywhere(actor: Actor, role: MemberRole): boolean {
  for (const held of actor.memberships.values()) if (held === role) return true
  return false
}

function grantedInTeam(actor: Actor, action: TeamAction, teamId: number): boolean {
  const held = actor.memberships.get(teamId)
  if (!held) return false
  const need = TEAM_RULES[action]
  return need === 'member' || ROLE_GRANTS[held].includes(need)
}

/**
 * Whether the actor reaches every team of the program for this action, whoever the team:
 * a mentor always; an operator for the cut queue's jobs.
 */
export function reachesWholeProgram(actor: Actor, action: Action): boolean {
  if (actor.isMentor) return true
  return action === 'job.view' && can(actor, 'queue.work')
}

/**
 * The policy. Program actions need no subject. A team action with a subject asks about
 * that team's thing; without one it asks whether the actor may do it in any team at all.
 */
export function can(actor: Actor, action: Action, subject?: TeamSubject): boolean {
  if (subject && subject.programId !== actor.programId) return false
  if (isProgramAction(action)) {
    const rule = PROGRAM_RULES[action]
    return actor.isMentor || rule === 'anyone' || (rule === 'operator' && holdsAnywhere(actor, 'operator'))
  }
  if (reachesWholeProgram(actor, action)) return true
  if (!subject) return [...actor.memberships.keys()].some((teamId) => grantedInTeam(actor, action, teamId))
  return grantedInTeam(actor, action, subject.teamId)
}

/** The teams (ids) of the actor's program in which it may do `action`; null for every team. */
export function teamsFor(actor: Actor, action: TeamAction): number[] | null {
  if (reachesWholeProgram(actor, action)) return null
  return [...actor.memberships.keys()].filter((teamId) => grantedInTeam(actor, action, teamId))
}

/** The answers for several actions at once, as the API hands them to the pages. */
export function flags<A extends Action>(actor: Actor, actions: readonly A[], subject?: TeamSubject): Can<A> {
  return Object.fromEntries(actions.map((a) => [a, can(actor, a, subject)])) as Can<A>
}

/** Every action, program-wide ("anywhere"), for /api/me. */
export function programFlags(actor: Actor): Can {
  return flags(actor, ACTIONS)
}

/** Every team action in one team, for /api/me's list of teams. */
export function teamFlags(actor: Actor, subject: TeamSubject): Can<TeamAction> {
  return flags(actor, TEAM_ACTIONS, subject)
}

/** The words of a refusal (403), per action. */
export const REFUSALS: Record<Action, string> = {
  'team.manage': 'Only a mentor may change teams.',
  'people.manage': 'Only a mentor may change who is in the program.',
  'film.manage': 'Only a mentor may change the film stock.',
  'robot.create': 'Only a mentor may add robots.',
  'revision.review': 'Only a mentor may approve or send back a revision.',
  'audit.view': 'Only a mentor may read the program\'s activity.',
  'mail.view': 'Please sign in to read your mail.',
  'outbox.view': 'Only a mentor may see the program\'s waiting mail.',
  'program.manage': 'Only a mentor may change the program\'s settings.',
  'queue.work': 'Only an operator or a mentor works the cut queue.',
  'film.test': 'Only an operator or a mentor records test cuts.',
  'team.view': 'You are not on this team.',
  'team.members': 'Only the team\'s students and designers, or a mentor, may open the team\'s page.',
  'artwork.view': 'You are not on this team.',
  'artwork.upload': 'Only a student, a designer or a mentor may upload drawings.',
  'artwork.revise': 'Only a designer or a mentor may tune the outline or make a new revision.',
  'revision.submit': 'Only the team\'s students and designers, or a mentor, may submit this revision.',
  'robot.view': 'You are not on this team.',
  'placement.create': 'Only a designer or a mentor may place decals on a robot.',
  'placement.edit': 'Only a designer or a mentor may change or remove a placement.',
  'placement.reprint': 'Only the team\'s members or a mentor may ask for a reprint or apply a spare.',
  'robot.edit': 'Only a designer or a mentor may rename a robot.',
  'job.view': 'You are not on this team.',
}

/** Every distinct role the actor holds anywhere in the program. */
export function actorRoles(actor: Actor): Role[] {
  const roles = new Set<Role>()
  if (actor.isMentor) roles.add('mentor')
  for (const role of actor.memberships.values()) roles.add(role)
  return [...roles]
}
