import { describe, expect, inject } from 'vitest'
import { sql, type Transaction } from 'kysely'
import type { Database } from '../../server/db/schema'
import { createDb } from '../../server/db/connect'
import { findRobot, findPlacement } from '../../server/robots/queries'
import { applySpare, approvedRevisions, createPlacement, editPlacement, editRobot, listRobots, removePlacement, requestReprint } from '../../server/robots/service'
import { findJob } from '../../server/jobs/queries'
import { cancelJob, failJob, jobDetail, listJobs, moveJob } from '../../server/jobs/service'
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

describe('corrections', () => {
  async function placed(trx: Transaction<Database>, o: { quantity?: number; spares?: number; sheets?: number } = {}) {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'approved', title: 'Kite' })
    const mentor = await actorOf(trx, p.mentor)
    const operator = await actorOf(trx, team.operator)
    const designer = await actorOf(trx, team.designer)
    const robot = (await findRobot(trx, mentor, await addRobot(trx, team.id)))!
    const placement = await createPlacement(trx, designer, robot, { ...place, quantity: o.quantity ?? 2, spares: o.spares ?? 1, revisionId: art.revisionId, filmId: p.films.pet })
    const job = async (id: number) => (await findJob(trx, operator, id))!
    const film = async () => (await trx.selectFrom('film').select('sheets_on_hand').where('id', '=', p.films.pet).executeTakeFirstOrThrow()).sheets_on_hand
    const spares = async () => (await trx.selectFrom('placement').select('spares_on_hand').where('id', '=', placement.id).executeTakeFirstOrThrow()).spares_on_hand
    return { p, team, art, mentor, operator, designer, robot, placement, jobId: placement.jobs[0]!.id, job, film, spares }
  }

  test('cutting takes the sheets the layout used and puts the copies on hand; applying says how many went on the robot, the rest are spares', async ({ trx }) => {
    const c = await placed(trx)
    expect(await c.film()).toBe(20)
    // 3 copies of 50 × 33.3 mm fit on one 300 × 200 mm sheet.
    const cut = await moveJob(trx, c.operator, await c.job(c.jobId), { state: 'cut' })
    expect(cut).toMatchObject({ state: 'cut', sheetsUsed: 1, placement: { sparesOnHand: 3 } })
    expect(await c.film()).toBe(19)
    const applied = await moveJob(trx, c.operator, await c.job(c.jobId), { state: 'applied' })
    expect(applied).toMatchObject({ state: 'applied', appliedCount: 2, placement: { sparesOnHand: 1 } })
    expect(applied.history.map((h) => [h.action, h.detail.sheets ?? h.detail.applied ?? null])).toEqual([['queue-job', null], ['mark-cut', 1], ['mark-applied', 2]])
    const stock = await trx.selectFrom('film_stock_event').select(['kind', 'change', 'on_hand', 'job_id']).where('film_id', '=', c.p.films.pet).execute()
    expect(stock).toEqual([{ kind: 'cut', change: -1, on_hand: 19, job_id: c.jobId }])
  })

  test('the shelf never goes below zero; a shortfall is recorded for a recount', async ({ trx }) => {
    const c = await placed(trx)
    await trx.updateTable('film').set({ sheets_on_hand: 1 }).where('id', '=', c.p.films.pet).execute()
    await moveJob(trx, c.operator, await c.job(c.jobId), { state: 'cut', sheetsUsed: 3 })
    expect(await c.film()).toBe(0)
    const line = await trx.selectFrom('film_stock_event').select(['change', 'on_hand', 'note']).where('job_id', '=', c.jobId).executeTakeFirstOrThrow()
    expect(line).toMatchObject({ change: -1, on_hand: 0, note: expect.stringMatching(/used 3 sheets but the stock said 1: count the shelf/) })
  })

  test('a spare is applied before asking for a reprint; a reprint\'s copies join the spares when cut', async ({ trx }) => {
    const c = await placed(trx)
    await moveJob(trx, c.operator, await c.job(c.jobId), { state: 'cut' })
    await moveJob(trx, c.operator, await c.job(c.jobId), { state: 'applied' })
    const student = await actorOf(trx, c.team.student)
    const found = (await findPlacement(trx, student, c.placement.id))!
    const after = await applySpare(trx, student, found, { count: 1, reason: 'torn off in a match' })
    expect(after.sparesOnHand).toBe(0)
    await expect(applySpare(trx, student, found, { count: 1, reason: 'again' })).rejects.toMatchObject({ statusCode: 409, message: /No spares are on hand: ask for a reprint/ })
    const reprint = await requestReprint(trx, student, (await findPlacement(trx, student, c.placement.id))!, { quantity: 2, reason: 'torn again' })
    expect(reprint.sparesOnHand).toBe(0)
    await moveJob(trx, c.operator, await c.job(reprint.jobId), { state: 'cut' })
    expect(await c.spares()).toBe(2)
    // Applied: one went on the robot, one stays a spare.
    expect((await moveJob(trx, c.operator, await c.job(reprint.jobId), { state: 'applied', applied: 1 })).appliedCount).toBe(1)
    expect(await c.spares()).toBe(1)
    expect((await historyOf(trx, student, { robotId: c.robot.id })).map((h) => h.action)).toContain('apply-spare')
  })

  test('a job is cancelled with a reason before it is cut, by an operator or a mentor; never after', async ({ trx }) => {
    const c = await placed(trx)
    const cancelled = await cancelJob(trx, c.mentor, await c.job(c.jobId), 'asked for twice')
    expect(cancelled).toMatchObject({ state: 'cancelled', cancelReason: 'asked for twice', cancelledBy: 'Fixture Mentor' })
    expect(await statusOf(moveJob(trx, c.operator, await c.job(c.jobId), { state: 'cut' }))).toBe(409)
    expect(await statusOf(cancelJob(trx, c.operator, await c.job(c.jobId), 'again'))).toBe(409)
    const other = await placed(trx)
    await moveJob(trx, other.operator, await other.job(other.jobId), { state: 'cut' })
    expect(await statusOf(cancelJob(trx, other.operator, await other.job(other.jobId), 'too late'))).toBe(409)
    expect(cancelled.history.map((h) => h.action)).toEqual(['queue-job', 'cancel-job'])
  })

  test('a failed cut is recorded and queues a recut of the same revision at the same width; the operators are mailed', async ({ trx, mail }) => {
    const c = await placed(trx)
    // Burnt on the machine: the sheet is used, two of three copies spoilt, the good one is on hand.
    const failed = await failJob(trx, c.operator, await c.job(c.jobId), { failure: 'burnt', note: 'flare at the corner', copies: 2 })
    expect(failed).toMatchObject({ state: 'failed', failure: 'burnt', failureNote: 'flare at the corner', sheetsUsed: 1, placement: { sparesOnHand: 1 } })
    const recut = (await c.job(failed.recutBy!))
    expect(recut).toMatchObject({ kind: 'recut', job_quantity: 2, state: 'queued', recut_of: c.jobId, job_width: 50, revision_id: c.art.revisionId })
    expect(await c.film()).toBe(19)
    expect((await mail.queued(c.p.id)).map((m) => m.subject)).toContain('Recut: 2 × Kite for ' + c.robot.name)
    // Found mis-weeded after it was cut: those copies leave the ones on hand.
    await moveJob(trx, c.operator, recut, { state: 'cut' })
    expect(await c.spares()).toBe(3)
    const again = await failJob(trx, c.operator, await c.job(recut.job_id), { failure: 'mis-weeded', note: '' })
    expect(again.placement.sparesOnHand).toBe(1)
    expect(await statusOf(failJob(trx, c.operator, await c.job(recut.job_id), { failure: 'lifted', note: '' }))).toBe(409)
    expect((await historyOf(trx, c.operator, { jobId: c.jobId })).map((h) => h.action)).toEqual(['queue-job', 'fail-job'])
  })

  test('an edit queues what is missing and never changes a cut job; a new width cancels the queued jobs at the old one', async ({ trx }) => {
    const c = await placed(trx)
    const found = async () => (await findPlacement(trx, c.designer, c.placement.id))!
    // The first cut is done.
    await moveJob(trx, c.operator, await c.job(c.jobId), { state: 'cut' })
    const spot = await editPlacement(trx, c.designer, await found(), { spot: 'front bumper' })
    expect(spot).toMatchObject({ queuedJobId: null, cancelledJobIds: [], placement: { spot: 'front bumper' } })
    const more = await editPlacement(trx, c.designer, await found(), { quantity: 3, spares: 2 })
    expect(more.queuedJobId).not.toBeNull()
    expect(await c.job(more.queuedJobId!)).toMatchObject({ kind: 'extra', job_quantity: 2, job_width: 50 })
    expect((await c.job(c.jobId))).toMatchObject({ state: 'cut', job_quantity: 3, job_width: 50 })
    const fewer = await editPlacement(trx, c.designer, await found(), { quantity: 2 })
    expect(fewer).toMatchObject({ queuedJobId: null, cancelledJobIds: [] })
    expect(fewer.summary).toMatch(/1 copy already cut or queued beyond what is needed now/)
    // Wider: all copies again at 60 mm; the queued extra job at 50 mm is cancelled; the cut one stays.
    const wider = await editPlacement(trx, c.designer, await found(), { widthMm: 60 })
    expect(wider.cancelledJobIds).toEqual([more.queuedJobId])
    expect(await c.job(wider.queuedJobId!)).toMatchObject({ kind: 'extra', job_quantity: 4, job_width: 60, state: 'queued' })
    expect(await c.job(more.queuedJobId!)).toMatchObject({ state: 'cancelled', cancel_reason: expect.stringMatching(/from 50 mm to 60 mm wide; job \d+ cuts the new size/) })
    expect(await c.job(c.jobId)).toMatchObject({ state: 'cut', job_width: 50 })
    expect(wider.placement).toMatchObject({ widthMm: 60, sparesOnHand: 0 })
    expect(wider.summary).toMatch(/3 spares at the old size set aside/)
    expect((await historyOf(trx, c.designer, { robotId: c.robot.id })).filter((h) => h.action === 'edit-placement').map((h) => Object.keys(h.detail.changes as object).sort()))
      .toEqual([['spot'], ['quantity', 'spares'], ['quantity'], ['widthMm']])
  })

  test('a placement is removed with a reason: its queued jobs are cancelled, the robot no longer shows it', async ({ trx }) => {
    const c = await placed(trx)
    const removed = await removePlacement(trx, c.designer, (await findPlacement(trx, c.designer, c.placement.id))!, 'panel replaced')
    expect(removed.cancelledJobIds).toEqual([c.jobId])
    expect((await findRobot(trx, c.designer, c.robot.id))!.placements).toEqual([])
    expect(await statusOf(requestReprint(trx, c.designer, (await findPlacement(trx, c.designer, c.placement.id))!, { quantity: 1, reason: 'x' }))).toBe(409)
    expect((await c.job(c.jobId)).cancel_reason).toBe('The placement was removed: panel replaced')
  })

  test('a robot is renamed; its name stays unique in its team and season', async ({ trx }) => {
    const c = await placed(trx)
    const other = await addRobot(trx, c.team.id, 'Heron')
    const renamed = await editRobot(trx, c.designer, c.robot, { name: 'Osprey' })
    expect(renamed).toMatchObject({ name: 'Osprey', season: '2026–27' })
    expect(await statusOf(editRobot(trx, c.designer, (await findRobot(trx, c.designer, other))!, { name: 'Osprey' }))).toBe(409)
    expect((await historyOf(trx, c.designer, { robotId: c.robot.id })).at(-1)).toMatchObject({ action: 'edit-robot', detail: { name: 'Osprey', from: { name: c.robot.name } } })
  })
})
