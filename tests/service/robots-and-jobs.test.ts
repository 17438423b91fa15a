import { describe, expect, inject } from 'vitest'
import { sql } from 'kysely'
import { createDb } from '../../server/db/connect'
import { findRobot, findPlacement } from '../../server/robots/queries'
import { approvedRevisions, createPlacement, listRobots, requestReprint } from '../../server/robots/service'
import { findJob } from '../../server/jobs/queries'
import { jobDetail, listJobs, moveJob } from '../../server/jobs/service'
import { historyOf } from '../../server/history/service'
import { actorOf, serviceDb, statusOf, test } from '../support/service'
import { addArtwork, addRobot, buildProgram } from '../support/fixtures'

const place = { spot: 'left side panel', widthMm: 50, quantity: 2, spares: 1 }

describe('placements and the cut queue', () => {
  test('a designer places an approved revision: the placement, its job, the history and the operators\' mail come together', async ({ trx, mail }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'approved', title: 'Wren' })
    const robotId = await addRobot(trx, team.id, 'Marlin')
    const designer = await actorOf(trx, team.designer)
    const robot = (await findRobot(trx, designer, robotId))!
    expect((await approvedRevisions(trx, robot)).map((r) => r.revisionId)).toEqual([art.revisionId])
    const placed = await createPlacement(trx, designer, robot, { ...place, revisionId: art.revisionId, filmId: p.films.pet })
    expect(placed).toMatchObject({ spot: 'left side panel', widthMm: 50, quantity: 2, spares: 1, revision: { id: art.revisionId } })
    expect(placed.jobs).toEqual([expect.objectContaining({ kind: 'initial', quantity: 3, state: 'queued' })])
    const queued = await mail.queued(p.id)
    expect(queued.map((m) => m.to)).toEqual([[p.emails.get(team.operator)]])
    expect(queued[0]!.subject).toMatch(/New cut job: 3 × Wren/)
    expect((await historyOf(trx, designer, { robotId })).map((h) => h.action)).toEqual(['place', 'queue-job'])
    expect((await historyOf(trx, designer, { artworkId: art.id })).map((h) => h.action)).toEqual(['place'])
    expect((await historyOf(trx, designer, { jobId: placed.jobs[0]!.id })).map((h) => h.action)).toEqual(['queue-job'])
  })

  test('refuses a revision that is not approved, another team\'s, film that may never be cut, and film waiting for the lab\'s approval', async ({ trx }) => {
    const p = await buildProgram(trx)
    const [a, b] = p.teams
    const mentor = await actorOf(trx, p.mentor)
    const robot = (await findRobot(trx, mentor, await addRobot(trx, a.id)))!
    const draft = await addArtwork(trx, { teamId: a.id, authorId: a.student })
    const theirs = await addArtwork(trx, { teamId: b.id, authorId: b.student, status: 'approved' })
    const ours = await addArtwork(trx, { teamId: a.id, authorId: a.student, status: 'approved' })
    expect(await statusOf(createPlacement(trx, mentor, robot, { ...place, revisionId: draft.revisionId, filmId: p.films.pet }))).toBe(409)
    expect(await statusOf(createPlacement(trx, mentor, robot, { ...place, revisionId: theirs.revisionId, filmId: p.films.pet }))).toBe(400)
    await expect(createPlacement(trx, mentor, robot, { ...place, revisionId: ours.revisionId, filmId: p.films.pvc })).rejects.toMatchObject({ statusCode: 422, message: /hydrogen chloride/ })
    await expect(createPlacement(trx, mentor, robot, { ...place, revisionId: ours.revisionId, filmId: p.films.pu })).rejects.toMatchObject({ statusCode: 422, message: /lab's approval/ })
    // Nothing of the refused attempts is left.
    expect((await findRobot(trx, mentor, robot.id))!.placements).toEqual([])
  })

  test('reprints and the queue\'s order: queued first, oldest first; then the rest, newest first', async ({ trx }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'approved' })
    const mentor = await actorOf(trx, p.mentor)
    const robot = (await findRobot(trx, mentor, await addRobot(trx, team.id)))!
    const placed = await createPlacement(trx, mentor, robot, { ...place, revisionId: art.revisionId, filmId: p.films.pet })
    const student = await actorOf(trx, team.student)
    const placement = (await findPlacement(trx, student, placed.id))!
    const reprints = []
    for (let i = 0; i < 3; i++) reprints.push((await requestReprint(trx, student, placement, { quantity: 1, reason: `torn ${i}` })).jobId)
    const operator = await actorOf(trx, team.operator)
    const [initial, r1, r2, r3] = [placed.jobs[0]!.id, ...reprints]
    await moveJob(trx, operator, (await findJob(trx, operator, initial))!, { state: 'cut' })
    await moveJob(trx, operator, (await findJob(trx, operator, r2!))!, { state: 'cut' })
    const order = [r1, r3, r2, initial]
    const first = await listJobs(trx, operator, { limit: 3 })
    const rest = await listJobs(trx, operator, { limit: 3, cursor: first.nextCursor! })
    expect([...first.items, ...rest.items].map((j) => j.id)).toEqual(order)
    expect((await listJobs(trx, operator, { limit: 10, state: 'cut' })).items.map((j) => j.id)).toEqual([r2, initial])
    // Forward only.
    expect(await statusOf(moveJob(trx, operator, (await findJob(trx, operator, r1!))!, { state: 'applied' }))).toBe(409)
    const applied = await moveJob(trx, operator, (await findJob(trx, operator, initial))!, { state: 'applied' })
    expect(applied.history.map((h) => h.action)).toEqual(['queue-job', 'mark-cut', 'mark-applied'])
    expect(applied.can).toEqual({ 'queue.work': true })
    expect((await jobDetail(trx, student, (await findJob(trx, student, r1!))!)).can).toEqual({ 'queue.work': false })
  })

  test('the robot list pages by team and season and shows each robot\'s placements', async ({ trx }) => {
    const p = await buildProgram(trx)
    const [a, b] = p.teams
    const names = [[a.id, 'Alpha'], [a.id, 'Beta'], [b.id, 'Gamma']] as const
    for (const [teamId, name] of names) await addRobot(trx, teamId, name)
    const mentor = await actorOf(trx, p.mentor)
    const first = await listRobots(trx, mentor, { limit: 2 })
    const rest = await listRobots(trx, mentor, { limit: 2, cursor: first.nextCursor! })
    expect([...first.items, ...rest.items].map((r) => r.name)).toEqual(['Alpha', 'Beta', 'Gamma'])
    expect((await listRobots(trx, await actorOf(trx, b.student), { limit: 10 })).items.map((r) => r.name)).toEqual(['Gamma'])
  })
})

describe('work inside a transaction', () => {
  // Every query inside a transaction goes through it: on a pool of one connection, five
  // placements and reprints at once finish one after another instead of waiting forever for
  // a second connection. These commit, in a program of their own.
  test('needs no second pool connection, even with five requests at once', async () => {
    const setup = serviceDb()
    const p = await buildProgram(setup)
    const team = p.teams[0]
    const art = await addArtwork(setup, { teamId: team.id, authorId: team.student, status: 'approved' })
    const robotId = await addRobot(setup, team.id)
    const one = createDb(inject('serviceDatabaseUrl'), 1)
    try {
      const actor = await actorOf(one, p.mentor)
      const work = (async () => {
        const robot = (await findRobot(one, actor, robotId))!
        const first = await createPlacement(one, actor, robot, { ...place, revisionId: art.revisionId, filmId: p.films.pet })
        const placement = (await findPlacement(one, actor, first.id))!
        await Promise.all([
          ...[1, 2, 3].map(() => createPlacement(one, actor, robot, { ...place, revisionId: art.revisionId, filmId: p.films.pet })),
          ...[1, 2].map(() => requestReprint(one, actor, placement, { quantity: 1, reason: 'burst' })),
        ])
      })()
      const stuck = new Promise((_, reject) => setTimeout(() => reject(new Error('the pool is deadlocked')), 15_000).unref())
      await Promise.race([work, stuck])
      const { n } = await one.selectFrom('job').innerJoin('placement', 'placement.id', 'job.placement_id')
        .select(sql<number>`count(*)::int`.as('n')).where('placement.robot_id', '=', robotId).executeTakeFirstOrThrow()
      expect(n).toBe(6)
    } finally {
      await one.destroy()
    }
  })
})
