// Colour layers in the database (migration 0013), tried with raw SQL that bypasses every form
// and route: a layer's film must be one that may be cut, a layered revision's job must name its
// layer, and layers are as immutable as their revision.
import { describe, expect } from 'vitest'
import { sql } from 'kysely'
import { test } from '../support/service'
import { refused } from '../support/refused'
import { addArtwork, addRobot, buildProgram } from '../support/fixtures'

const INKS = [{ name: 'white', hex: '#f4f4f0' }, { name: 'red', hex: '#c8102e' }, { name: 'blue', hex: '#1f4e9c' }]

describe('colour layers in the database', () => {
  test('a layered placement can put no layer in a film that may not be cut, and its jobs name a layer of the revision', async ({ trx }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'approved', layers: INKS })
    const robot = await addRobot(trx, team.id)
    const placement = (await sql<{ id: number }>`insert into placement (robot_id, revision_id, film_id, spot, width_mm, quantity, created_by)
      values (${robot}, ${art.revisionId}, ${p.films.pet}, 'front', 40, 1, ${p.mentor}) returning id`.execute(trx)).rows[0]!.id

    await sql`insert into placement_layer_film (placement_id, position, film_id) values (${placement}, 0, ${p.films.pet}), (${placement}, 1, ${p.films.pet})`.execute(trx)
    // PVC never clears; polyurethane waits for the lab's approval: neither takes a layer.
    expect(await refused(trx, sql`insert into placement_layer_film (placement_id, position, film_id) values (${placement}, 2, ${p.films.pvc})`)).toMatch(/placement_layer_film_cleared|film_cleared/)
    expect(await refused(trx, sql`insert into placement_layer_film (placement_id, position, film_id, film_cleared) values (${placement}, 2, ${p.films.pu}, null)`)).toMatch(/film that may be cut/)
    expect(await refused(trx, sql`insert into placement_layer_film (placement_id, position, film_id) values (${placement}, 2, ${p.films.pu})`)).toMatch(/placement_layer_film_cleared/)

    const order = (await sql<{ id: number }>`insert into job_order (placement_id, created_by) values (${placement}, ${p.mentor}) returning id`.execute(trx)).rows[0]!.id
    await sql`insert into job (placement_id, kind, quantity, film_id, width_mm, created_by, layer, order_id) values (${placement}, 'initial', 1, ${p.films.pet}, 40, ${p.mentor}, 1, ${order})`.execute(trx)
    // The whole stacked vector is never cut as one job, and a layer the revision lacks is no layer.
    expect(await refused(trx, sql`insert into job (placement_id, kind, quantity, film_id, width_mm, created_by) values (${placement}, 'initial', 1, ${p.films.pet}, 40, ${p.mentor})`)).toMatch(/job_layer_of_revision/)
    expect(await refused(trx, sql`insert into job (placement_id, kind, quantity, film_id, width_mm, created_by, layer, order_id) values (${placement}, 'initial', 1, ${p.films.pet}, 40, ${p.mentor}, 3, ${order})`)).toMatch(/job_layer_of_revision/)
    expect(await refused(trx, sql`insert into job (placement_id, kind, quantity, film_id, width_mm, created_by, layer) values (${placement}, 'initial', 1, ${p.films.pet}, 40, ${p.mentor}, 0)`)).toMatch(/job_layer_in_order/)
  })

  test('a one-colour revision keeps one layer and its jobs name none; layers never change', async ({ trx }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const single = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'approved' })
    const layered = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'approved', layers: INKS.slice(0, 2) })
    const robot = await addRobot(trx, team.id)
    expect((await trx.selectFrom('revision').select('layer_count').where('id', '=', single.revisionId).executeTakeFirstOrThrow()).layer_count).toBe(1)
    const placement = (await sql<{ id: number }>`insert into placement (robot_id, revision_id, film_id, spot, width_mm, quantity, created_by)
      values (${robot}, ${single.revisionId}, ${p.films.pet}, 'front', 40, 1, ${p.mentor}) returning id`.execute(trx)).rows[0]!.id
    const order = (await sql<{ id: number }>`insert into job_order (placement_id, created_by) values (${placement}, ${p.mentor}) returning id`.execute(trx)).rows[0]!.id
    expect(await refused(trx, sql`insert into job (placement_id, kind, quantity, film_id, width_mm, created_by, layer, order_id) values (${placement}, 'initial', 1, ${p.films.pet}, 40, ${p.mentor}, 0, ${order})`)).toMatch(/job_layer_of_revision/)

    expect(await refused(trx, sql`update revision_layer set hex = '#000000' where revision_id = ${layered.revisionId}`)).toMatch(/immutable/)
    expect(await refused(trx, sql`insert into revision_layer (revision_id, position, name, hex, vector_key, measurements) values (${layered.revisionId}, 6, 'green', '#00ff00', 'v', '{}')`)).toMatch(/position/)
    expect(await refused(trx, sql`insert into revision_layer (revision_id, position, name, hex, vector_key, measurements) values (${layered.revisionId}, 2, 'green', 'green', 'v', '{}')`)).toMatch(/hex/)
  })
})
