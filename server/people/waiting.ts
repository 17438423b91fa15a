// What waits for a mentor, at a glance: revisions to review, the cut queue and what blocks it,
// films running low, and robots that carry no decal yet. Counted in SQL for the whole program.
import { sql } from 'kysely'
import type { ProgramWaiting } from '#shared/types/api'
import type { Db } from '../platform/db'
import type { Actor } from '../policy'
import { stockForecast } from '../jobs/service'
import { filmsOfProgram } from '../films/queries'
import { notUsableBecause } from '../films/service'

/** A film with this many sheets or fewer on the shelf is "running low" (common practice: one sheet per job, a job or two ahead). */
export const LOW_SHEETS = 2

export async function programWaiting(db: Db, actor: Actor): Promise<ProgramWaiting> {
  const programId = actor.programId
  const [review, queued, films, stock, bare] = await Promise.all([
    db.selectFrom('revision_status')
      .innerJoin('revision', 'revision.id', 'revision_status.revision_id')
      .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
      .innerJoin('team', 'team.id', 'artwork.team_id')
      .where('team.program_id', '=', programId).where('revision_status.status', '=', 'in-review')
      .select(sql<number>`count(*)::int`.as('n')).executeTakeFirstOrThrow(),
    db.selectFrom('job')
      .innerJoin('placement', 'placement.id', 'job.placement_id')
      .innerJoin('robot', 'robot.id', 'placement.robot_id')
      .innerJoin('team', 'team.id', 'robot.team_id')
      .innerJoin('revision', 'revision.id', 'placement.revision_id')
      .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
      .where('team.program_id', '=', programId).where('job.state', '=', 'queued')
      .select(['job.id', 'job.film_id', 'artwork.title', 'robot.name as robot_name'])
      .orderBy('job.id').execute(),
    filmsOfProgram(db, programId),
    stockForecast(db, programId),
    db.selectFrom('robot')
      .innerJoin('team', 'team.id', 'robot.team_id')
      .where('team.program_id', '=', programId)
      .where(({ not, exists, selectFrom }) => not(exists(
        selectFrom('placement').select('placement.id').whereRef('placement.robot_id', '=', 'robot.id').where('placement.removed_at', 'is', null),
      )))
      .select(['robot.id', 'robot.name', 'team.name as team_name']).orderBy('robot.name').execute(),
  ])
  const filmById = new Map(films.map((f) => [f.id, f]))
  const blocked = queued.flatMap((j) => {
    const film = filmById.get(j.film_id)
    const why = film ? notUsableBecause(film) : null
    const s = stock.get(j.id)
    const reason = why ?? (s && !s.enough ? `needs ${s.sheetsNeeded} sheet${s.sheetsNeeded === 1 ? '' : 's'} of ${film?.name ?? 'its film'}; ${Math.max(0, s.onHand - s.neededAhead)} left for it` : null)
    return reason ? [{ jobId: j.id, title: j.title, robot: j.robot_name, reason }] : []
  })
  const neededByFilm = new Map<number, number>()
  for (const s of queued) neededByFilm.set(s.film_id, (neededByFilm.get(s.film_id) ?? 0) + (stock.get(s.id)?.sheetsNeeded ?? 0))
  const low = films
    .filter((f) => !f.retired && f.cleared)
    .map((f) => ({ filmId: f.id, name: f.name, onHand: f.sheets_on_hand, needed: neededByFilm.get(f.id) ?? 0 }))
    .filter((f) => f.onHand <= LOW_SHEETS || f.needed > f.onHand)
  return {
    toReview: review.n,
    jobsQueued: queued.length,
    jobsBlocked: blocked,
    filmsLow: low,
    robotsBare: bare.map((r) => ({ robotId: r.id, name: r.name, team: r.team_name })),
  }
}
