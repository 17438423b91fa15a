// What a person may do. The server decides (server/policy); the API hands its answers to the
// pages as `can` flags named by these actions, so no page decides for itself.

/** Work that belongs to the program as a whole: a mentor's, the cut queue, and one's own mail. */
export const PROGRAM_ACTIONS = [
  'team.manage', // create and rename teams
  'people.manage', // people, their roles and invitations
  'film.manage', // the film stock
  'robot.create',
  'revision.review', // approve or send back
  'audit.view', // the program's activity
  'mail.view', // one's own messages in the local mail fake
  'outbox.view', // the program's mail that has not gone out yet
  'program.manage', // the laser's work area
  'queue.work', // the cut queue: move, cancel and fail jobs, download cut sheets
  'film.test', // cut a film's test grid and record the result
] as const
export type ProgramAction = (typeof PROGRAM_ACTIONS)[number]

/** Work on one team's things: the person's role in that team decides. */
export const TEAM_ACTIONS = [
  'team.view', // see the team in lists
  'team.members', // the team's page with its members
  'artwork.view',
  'artwork.upload',
  'artwork.revise', // tune on the bench, save a new revision
  'revision.submit',
  'robot.view',
  'placement.create',
  'placement.edit', // change a placement's spot, width, copies, or remove it
  'placement.reprint', // ask for a reprint, apply a spare
  'robot.edit', // rename a robot, change its season
  'job.view',
] as const
export type TeamAction = (typeof TEAM_ACTIONS)[number]

export type Action = ProgramAction | TeamAction
export const ACTIONS: readonly Action[] = [...PROGRAM_ACTIONS, ...TEAM_ACTIONS]

/** The answers for some actions: `can['artwork.revise']`. */
export type Can<A extends Action = Action> = { [K in A]: boolean }

export function isProgramAction(action: Action): action is ProgramAction {
  return (PROGRAM_ACTIONS as readonly string[]).includes(action)
}
