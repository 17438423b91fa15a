// Background work (a revision being made) belongs to the person who asked for it. They may
// follow it and cancel it while it waits; a mentor of the program may follow it too. For anyone
// else it does not exist (404).
import type { ExpressionBuilder } from 'kysely'
import type { Database } from '../db/schema'
import type { Actor } from './rules'

export interface WorkSubject { programId: number; askedBy: number }

export function canFollowWork(actor: Actor, work: WorkSubject): boolean {
  return work.programId === actor.programId && (work.askedBy === actor.id || actor.isMentor)
}

export function canCancelWork(actor: Actor, work: WorkSubject): boolean {
  return work.programId === actor.programId && work.askedBy === actor.id
}

/** The same rule as canFollowWork, as SQL on the work_item table. */
export function workScope(actor: Actor) {
  return (eb: ExpressionBuilder<Database, 'work_item'>) => {
    const inProgram = eb('work_item.program_id', '=', actor.programId)
    return actor.isMentor ? inProgram : eb.and([inProgram, eb('work_item.asked_by', '=', actor.id)])
  }
}
