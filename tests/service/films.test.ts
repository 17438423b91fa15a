import { describe, expect } from 'vitest'
import { approveFilm, createFilm, filmDetail, listFilms, listPolymers, recordStock, updateFilm, withdrawApproval, type FilmInput } from '../../server/films/service'
import { recordTest } from '../../server/films/test-cuts'
import { createPlacement } from '../../server/robots/service'
import { findRobot } from '../../server/robots/queries'
import { filmSchema } from '../../shared/utils/schemas'
import { actorOf, statusOf, test } from '../support/service'
import { addArtwork, addRobot, buildProgram } from '../support/fixtures'

const film: FilmInput = filmSchema.parse({
  name: 'Orange polyester', polymerCode: 'PET', colour: 'orange', colourHex: '#E07020', opacity: 'opaque', thicknessMm: 0.08,
  sheetWidthMm: 300, sheetHeightMm: 200, minFeatureMm: 0.8, laserPowerPct: 60, laserSpeedMmS: 10, laserPasses: 1, sheetsOnHand: 4,
})

describe('film stock', () => {
  test('a mentor adds and changes film; each program sees only its own', async ({ trx }) => {
    const p = await buildProgram(trx)
    const far = await buildProgram(trx)
    const mentor = await actorOf(trx, p.mentor)
    const created = await createFilm(trx, mentor, film)
    expect(created).toMatchObject({
      name: 'Orange polyester', usable: true, notUsableBecause: null, cleared: true, chlorineFree: true, colourHex: '#e07020',
      polymer: { code: 'PET', verdict: 'allowed' }, kerfMm: 0.15, kerfMeasured: false, sheetsOnHand: 4, lastTest: null, beamCaution: null,
    })
    const retired = await updateFilm(trx, mentor, created.id, { retired: true, retiredReason: 'Used up', laserPasses: 2 })
    expect(retired).toMatchObject({ retired: true, laserPasses: 2, usable: false, notUsableBecause: 'Retired from the stock: Used up' })
    expect((await listFilms(trx, mentor)).map((f) => f.name)).toEqual(['Fixture PET film', 'Fixture PVC film', 'Fixture PVC-free vinyl', 'Orange polyester'])
    const farMentor = await actorOf(trx, far.mentor)
    expect((await listFilms(trx, farMentor)).map((f) => f.id)).not.toContain(created.id)
    expect(await statusOf(updateFilm(trx, farMentor, created.id, { retired: false }))).toBe(404)
    expect(await statusOf(filmDetail(trx, farMentor, created.id))).toBe(404)
    const history = await trx.selectFrom('audit_event').select(['action', 'detail']).where('subject_type', '=', 'film').where('subject_id', '=', String(created.id)).orderBy('id').execute()
    expect(history.map((h) => h.action)).toEqual(['add-film', 'update-film'])
    // The sheets on the shelf when it was added are the stock's first line.
    expect((await filmDetail(trx, mentor, created.id)).stock).toEqual([expect.objectContaining({ kind: 'count', change: 4, onHand: 4 })])
  })

  test('the database\'s refusals come back as answers a mentor can act on', async ({ trx }) => {
    const p = await buildProgram(trx)
    const mentor = await actorOf(trx, p.mentor)
    expect(await statusOf(createFilm(trx, mentor, { ...film, name: 'Fixture PET film' }))).toBe(409)
    // A film in use keeps its polymer.
    const team = p.teams[0]
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'approved' })
    const robot = (await findRobot(trx, mentor, await addRobot(trx, team.id)))!
    await createPlacement(trx, mentor, robot, { revisionId: art.revisionId, filmId: p.films.pet, spot: 'front', widthMm: 40, quantity: 1, spares: 0 })
    await expect(updateFilm(trx, mentor, p.films.pet, { polymerCode: 'PP' })).rejects.toMatchObject({ statusCode: 409, data: { fieldErrors: { polymerCode: ['In use: add a new film instead.'] } } })
    // Each refusal rolled back only its own step: the transaction goes on.
    expect((await listFilms(trx, mentor)).find((f) => f.id === p.films.pet)?.polymer.code).toBe('PET')
    // A film nobody uses may change its polymer (a film migrated as "not known" is fixed this way).
    const unused = await createFilm(trx, mentor, { ...film, name: 'Unused' })
    expect((await updateFilm(trx, mentor, unused.id, { polymerCode: 'PP' })).polymer.code).toBe('PP')
  })

  test('the register answers searches by any common name, with the verdict and its source', async ({ trx }) => {
    const found = await listPolymers(trx, 'cast vinyl')
    expect(found[0]).toMatchObject({ code: 'PVC', verdict: 'never', chlorineFree: false, halogens: ['chlorine'] })
    expect(found[0]!.sources.length).toBeGreaterThan(0)
    expect((await listPolymers(trx, 'pvc-free'))[0]).toMatchObject({ code: 'PU', verdict: 'ask-the-lab', chlorineFree: true })
    expect((await listPolymers(trx)).length).toBeGreaterThan(20)
  })
})

describe('the lab\'s approval of an ask-the-lab polymer', () => {
  test('a PVC-free vinyl (polyurethane) film clears only once a mentor records the approval, with the data sheet; in use, it stays', async ({ trx }) => {
    const p = await buildProgram(trx)
    const mentor = await actorOf(trx, p.mentor)
    const team = p.teams[0]
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'approved' })
    const robot = (await findRobot(trx, mentor, await addRobot(trx, team.id)))!
    const place = () => createPlacement(trx, mentor, robot, { revisionId: art.revisionId, filmId: p.films.pu, spot: 'front', widthMm: 40, quantity: 1, spares: 0 })
    expect(await statusOf(place())).toBe(422)
    const before = (await listFilms(trx, mentor)).find((f) => f.id === p.films.pu)!
    expect(before).toMatchObject({ cleared: false, usable: false, labApproval: null, polymer: { code: 'PU', verdict: 'ask-the-lab' } })
    expect(before.notUsableBecause).toMatch(/needs the lab's approval[\s\S]*hydrogen cyanide/)

    const approved = await approveFilm(trx, mentor, p.films.pu, { safetyDataSheet: 'Maker X satin PU film, SDS rev. 3, 2025-02' })
    expect(approved).toMatchObject({ cleared: true, usable: true, labApproval: { safetyDataSheet: 'Maker X satin PU film, SDS rev. 3, 2025-02' } })
    expect(approved.labApproval!.by).toMatch(/Fixture Mentor/)
    expect((await place()).film.id).toBe(p.films.pu)
    // Withdrawn while a placement uses it: the database's key refuses.
    expect(await statusOf(withdrawApproval(trx, mentor, p.films.pu))).toBe(409)
    // Never-polymers cannot be approved at all; allowed ones need none.
    await expect(approveFilm(trx, mentor, p.films.pvc, { safetyDataSheet: 'any' })).rejects.toMatchObject({ statusCode: 422, message: /never be cleared/ })
    expect(await statusOf(approveFilm(trx, mentor, p.films.pet, { safetyDataSheet: 'any' }))).toBe(422)
    const lines = await trx.selectFrom('audit_event').select('action').where('subject_type', '=', 'film').where('subject_id', '=', String(p.films.pu)).execute()
    expect(lines.map((l) => l.action)).toEqual(['approve-film'])
  })
})

describe('test cuts and stock', () => {
  test('the square that weeded cleanly becomes the laser settings, with the history kept; a clear film\'s caution goes', async ({ trx }) => {
    const p = await buildProgram(trx)
    const mentor = await actorOf(trx, p.mentor)
    const operator = await actorOf(trx, p.teams[0].operator)
    const clear = await createFilm(trx, mentor, { ...film, name: 'Clear PET', colour: 'clear', colourHex: '#ffffff', opacity: 'clear' })
    expect(clear.beamCaution).toMatch(/clear film may let a blue diode laser's beam/)
    const grid = { power: { from: 40, to: 70, steps: 4 }, speed: { from: 10, to: 30, steps: 5 }, passes: 2, squareMm: 10 }
    // Power 40, 50, 60, 70 by row A–D; speed 10, 15, 20, 25, 30 by column 1–5: C4 is 60 % at 25 mm/s.
    const first = await recordTest(trx, operator, clear.id, { grid, square: null, kerfMm: null, note: 'Nothing cut through' })
    expect(first).toMatchObject({ lastTest: { result: 'none-clean', square: null }, laserPowerPct: 60, laserSpeedMmS: 10, beamCaution: null })
    const second = await recordTest(trx, operator, clear.id, { grid, square: 'C4', kerfMm: 0.18, note: '' })
    expect(second).toMatchObject({ laserPowerPct: 60, laserSpeedMmS: 25, laserPasses: 2, kerfMm: 0.18, kerfMeasured: true, lastTest: { square: 'C4', powerPct: 60, speedMmS: 25, by: expect.stringMatching(/operator/) } })
    expect(second.tests.map((t) => t.square)).toEqual(['C4', null])
    await expect(recordTest(trx, operator, clear.id, { grid, square: 'E1', kerfMm: null, note: '' })).rejects.toMatchObject({ statusCode: 400, message: /no square E1/ })
  })

  test('deliveries add, counts set, and the history says who and when', async ({ trx }) => {
    const p = await buildProgram(trx)
    const mentor = await actorOf(trx, p.mentor)
    const delivered = await recordStock(trx, mentor, p.films.pet, { kind: 'delivery', sheets: 10, note: 'Order 12' })
    expect(delivered.sheetsOnHand).toBe(30)
    const counted = await recordStock(trx, mentor, p.films.pet, { kind: 'count', sheets: 27, note: '' })
    expect(counted.sheetsOnHand).toBe(27)
    expect(counted.stock.map((e) => [e.kind, e.change, e.onHand])).toEqual([['count', -3, 27], ['delivery', 10, 30]])
  })
})
