import { describe, expect } from 'vitest'
import { createFilm, listFilms, updateFilm, type FilmInput } from '../../server/films/service'
import { createPlacement } from '../../server/robots/service'
import { findRobot } from '../../server/robots/queries'
import { actorOf, statusOf, test } from '../support/service'
import { addArtwork, addRobot, buildProgram } from '../support/fixtures'

const film: FilmInput = {
  name: 'Orange polyester', basePolymer: 'Polyester (PET)', chlorineFree: true, colour: 'orange', thicknessMm: 0.08,
  sheetWidthMm: 300, sheetHeightMm: 200, minFeatureMm: 0.8, laserPowerPct: 60, laserSpeedMmS: 10, laserPasses: 1, retired: false,
}

describe('film stock', () => {
  test('a mentor adds and changes film; each program sees only its own', async ({ trx }) => {
    const p = await buildProgram(trx)
    const far = await buildProgram(trx)
    const mentor = await actorOf(trx, p.mentor)
    const created = await createFilm(trx, mentor, film)
    expect(created).toMatchObject({ name: 'Orange polyester', usable: true, notUsableBecause: null })
    const retired = await updateFilm(trx, mentor, created.id, { retired: true, laserPasses: 2 })
    expect(retired).toMatchObject({ retired: true, laserPasses: 2, usable: false, notUsableBecause: 'Retired from the stock.' })
    expect((await listFilms(trx, mentor)).map((f) => f.name)).toEqual(['Fixture PET film', 'Fixture PVC film', 'Orange polyester'])
    const farMentor = await actorOf(trx, far.mentor)
    expect((await listFilms(trx, farMentor)).map((f) => f.id)).not.toContain(created.id)
    expect(await statusOf(updateFilm(trx, farMentor, created.id, { retired: false }))).toBe(404)
    const history = await trx.selectFrom('audit_event').select(['action', 'detail']).where('subject_type', '=', 'film').where('subject_id', '=', String(created.id)).orderBy('id').execute()
    expect(history.map((h) => h.action)).toEqual(['add-film', 'update-film'])
  })

  test('the database\'s refusals come back as answers a mentor can act on', async ({ trx }) => {
    const p = await buildProgram(trx)
    const mentor = await actorOf(trx, p.mentor)
    // PVC cannot be declared chlorine-free (a check constraint).
    const lie = createFilm(trx, mentor, { ...film, name: 'Lie', basePolymer: 'Calendered PVC' })
    await expect(lie).rejects.toMatchObject({ statusCode: 400, data: { fieldErrors: { chlorineFree: ['This polymer contains chlorine.'] } } })
    expect(await statusOf(createFilm(trx, mentor, { ...film, name: 'Fixture PET film' }))).toBe(409)
    // A film in use cannot be relabelled as chlorinated (the foreign key on placements).
    const team = p.teams[0]
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'approved' })
    const robot = (await findRobot(trx, mentor, await addRobot(trx, team.id)))!
    await createPlacement(trx, mentor, robot, { revisionId: art.revisionId, filmId: p.films.pet, spot: 'front', widthMm: 40, quantity: 1, spares: 0 })
    expect(await statusOf(updateFilm(trx, mentor, p.films.pet, { chlorineFree: false }))).toBe(409)
    // Each refusal rolled back only its own step: the transaction goes on.
    expect((await listFilms(trx, mentor)).find((f) => f.id === p.films.pet)?.chlorineFree).toBe(true)
  })
})
