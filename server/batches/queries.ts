import type { Db } from '../platform/db'
import type { Actor } from '../policy'

/** A batch of the actor's program (another program's is not found). */
export function findBatch(db: Db, actor: Actor, id: number) {
  return db.selectFrom('batch')
    .innerJoin('users as creator', 'creator.id', 'batch.created_by')
    .leftJoin('users as cutter', 'cutter.id', 'batch.cut_by')
    .select(['batch.id', 'batch.program_id as programId', 'batch.film_id', 'batch.state', 'batch.created_at', 'batch.cut_at', 'batch.sheets_used',
      'creator.name as creator_name', 'cutter.name as cutter_name'])
    .where('batch.id', '=', id).where('batch.program_id', '=', actor.programId)
    .executeTakeFirst()
}

export type BatchRow = NonNullable<Awaited<ReturnType<typeof findBatch>>>

/** The program's queued batches, newest first, with their jobs. */
export function queuedBatches(db: Db, programId: number) {
  return db.selectFrom('batch').innerJoin('film', 'film.id', 'batch.film_id').leftJoin('job', 'job.batch_id', 'batch.id')
    .select((eb) => ['batch.id', 'batch.film_id', 'film.name as film_name', 'batch.state', 'batch.created_at',
      eb.fn.coalesce(eb.fn.agg<number[]>('array_agg', ['job.id']).filterWhere('job.id', 'is not', null), eb.val<number[]>([])).as('job_ids'),
      eb.fn.coalesce(eb.fn.sum<number>('job.quantity'), eb.lit(0)).as('copies')])
    .where('batch.program_id', '=', programId).where('batch.state', '=', 'queued')
    .groupBy(['batch.id', 'film.name']).orderBy('batch.id', 'desc').limit(50)
    .execute()
}

/** Queued jobs in no batch, grouped by film, for films with two or more of them: batches worth making. */
export function batchableJobs(db: Db, programId: number) {
  return db.selectFrom('job')
    .innerJoin('placement', 'placement.id', 'job.placement_id').innerJoin('robot', 'robot.id', 'placement.robot_id')
    .innerJoin('team', 'team.id', 'robot.team_id').innerJoin('film', 'film.id', 'job.film_id')
    .select((eb) => ['film.id as film_id', 'film.name as film_name',
      eb.fn.agg<number[]>('array_agg', ['job.id']).orderBy('job.id').as('job_ids'), eb.fn.sum<number>('job.quantity').as('copies')])
    .where('team.program_id', '=', programId).where('job.state', '=', 'queued').where('job.batch_id', 'is', null)
    .where('film.cleared', '=', true).where('film.retired', '=', false)
    .groupBy(['film.id', 'film.name']).having((eb) => eb.fn.countAll(), '>=', 2).orderBy('film.name')
    .execute()
}
