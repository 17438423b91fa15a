// The policy's answer to "which rows may this actor see", as SQL: a condition on the `team`
// table joined into a query. Built from the same rules as `can`, so a list and a single
// lookup never disagree with the guards. Ownership sits in the SQL where: another team's or
// another program's row is simply not found (404).
import type { ExpressionBuilder } from 'kysely'
import type { Database } from '../db/schema'
import type { TeamAction } from '#shared/types/policy'
import { teamsFor, type Actor } from './rules'

export function teamScope(actor: Actor, action: TeamAction) {
  const teams = teamsFor(actor, action)
  return (eb: ExpressionBuilder<Database, 'team'>) => {
    const inProgram = eb('team.program_id', '=', actor.programId)
    // `in ()` is not SQL; 0 is never a team id.
    return teams === null ? inProgram : eb.and([inProgram, eb('team.id', 'in', teams.length ? teams : [0])])
  }
}
