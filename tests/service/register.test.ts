// The chlorine rule, held by the database through the polymer register, tried with raw SQL that
// bypasses every form and route. Each statement that must be refused runs in a savepoint, so
// one refusal does not end the test's transaction.
import { describe, expect } from 'vitest'
import { sql, type Transaction } from 'kysely'
import type { Database } from '../../server/db/schema'
import { matchPolymer, POLYMERS } from '../../shared/films/polymers'
import { test } from '../support/service'
import { addArtwork, addFilm, addRobot, buildProgram } from '../support/fixtures'
import { spellings } from '../support/spellings'
import { refused } from '../support/refused'

const HALOGENATED = POLYMERS.filter((p) => p.halogens.length > 0)

/** A robot, an approved revision and a placement in good film, to hang refused rows on. */
async function arrange(trx: Transaction<Database>) {
  const p = await buildProgram(trx)
  const team = p.teams[0]
  const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'approved' })
  const robot = await addRobot(trx, team.id)
  const placement = (await sql<{ id: number }>`insert into placement (robot_id, revision_id, film_id, spot, width_mm, quantity, created_by)
    values (${robot}, ${art.revisionId}, ${p.films.pet}, 'front', 40, 1, ${p.mentor}) returning id`.execute(trx)).rows[0]!.id
  const insertPlacement = (filmId: number) => sql`insert into placement (robot_id, revision_id, film_id, spot, width_mm, quantity, created_by)
    values (${robot}, ${art.revisionId}, ${filmId}, 'left side panel', 40, 1, ${p.mentor})`
  const insertJob = (filmId: number) => sql`insert into job (placement_id, kind, quantity, film_id, width_mm, created_by)
    values (${placement}, 'reprint', 1, ${filmId}, 40, ${p.mentor})`
  return { p, robot, art, placement, insertPlacement, insertJob }
}

describe('the register in the database', () => {
  test('holds exactly what shared/films/polymers.ts says (a changed register needs a migration)', async ({ trx }) => {
    const rows = await trx.selectFrom('polymer').selectAll().orderBy('code').execute()
    const want = [...POLYMERS].sort((a, b) => (a.code < b.code ? -1 : 1))
    expect(rows.map((r) => ({ code: r.code, name: r.name, names: r.names, halogens: r.halogens, verdict: r.verdict, why: r.why, sources: r.sources })))
      .toEqual(want.map((p) => ({ code: p.code, name: p.name, names: p.names, halogens: p.halogens, verdict: p.verdict, why: p.why, sources: p.sources })))
    for (const r of rows) expect(r.chlorine_free, r.code).toBe(!r.halogens.includes('chlorine'))
  })

  test('a polymer with chlorine or fluorine can never be given a verdict that clears it', async ({ trx }) => {
    for (const p of HALOGENATED) {
      for (const verdict of ['allowed', 'ask-the-lab']) {
        expect(await refused(trx, sql`update polymer set verdict = ${verdict} where code = ${p.code}`)).toMatch(/polymer_halogens_never/)
      }
    }
    expect(await refused(trx, sql`insert into polymer (code, name, halogens, verdict, why, sources)
      values ('NEWCL', 'A new chlorinated film', array['chlorine'], 'allowed', 'x', '[]'::jsonb)`)).toMatch(/polymer_halogens_never/)
    expect(await refused(trx, sql`update polymer set halogens = array['chlorine'] where code = 'PET'`)).toMatch(/polymer_halogens_never/)
  })
})

describe('every chlorine- and fluorine-bearing name and synonym, in several spellings, through raw SQL', () => {
  test('no film of it can claim a clearing verdict, be approved, be placed or be cut', async ({ trx }) => {
    const { p, insertPlacement, insertJob } = await arrange(trx)
    let tried = 0
    for (const polymer of HALOGENATED) {
      for (const name of polymer.names) {
        for (const typed of spellings(name)) {
          // What was typed is not a polymer: only a register code is.
          expect(await refused(trx, sql`insert into film (program_id, name, polymer_code, polymer_verdict, colour, colour_hex, opacity, thickness_mm, sheet_width_mm, sheet_height_mm, min_feature_mm, laser_power_pct, laser_speed_mm_s, laser_passes)
            values (${p.id}, ${`typed ${tried}`}, ${typed}, 'allowed', 'white', '#ffffff', 'opaque', 0.1, 300, 200, 0.8, 50, 10, 1)`)).toMatch(/film_polymer/)
          // The register reads the spelling as the polymer; the film cannot carry any verdict but its own.
          const code = matchPolymer(typed)!.code
          expect(code, typed).toBe(polymer.code)
          for (const claim of ['allowed', 'ask-the-lab']) {
            expect(await refused(trx, sql`insert into film (program_id, name, polymer_code, polymer_verdict, colour, colour_hex, opacity, thickness_mm, sheet_width_mm, sheet_height_mm, min_feature_mm, laser_power_pct, laser_speed_mm_s, laser_passes)
              values (${p.id}, ${`claim ${tried}`}, ${code}, ${claim}, 'white', '#ffffff', 'opaque', 0.1, 300, 200, 0.8, 50, 10, 1)`)).toMatch(/film_polymer/)
          }
          // As what it is, the film may be in the stock (to say why it is never cut), but no approval sticks to it…
          const film = await addFilm(trx, p.id, { name: `${polymer.code} ${tried}`, polymer: code })
          expect(await refused(trx, sql`update film set lab_approved_by = ${p.mentor}, lab_approved_at = now(), lab_approval_sds = 'any' where id = ${film}`)).toMatch(/film_lab_approval_asked/)
          // …and nothing can be placed or cut in it, however the row is written.
          expect(await refused(trx, insertPlacement(film))).toMatch(/placement_film_cleared/)
          expect(await refused(trx, insertJob(film))).toMatch(/job_film_cleared/)
          tried++
        }
      }
    }
    expect(tried).toBeGreaterThan(300)
  })

  test('nor by claiming the film is cleared in the row itself, or leaving the key out', async ({ trx }) => {
    const { p, robot, art, placement, insertJob } = await arrange(trx)
    const pvc = p.films.pvc
    expect(await refused(trx, sql`insert into placement (robot_id, revision_id, film_id, film_cleared, spot, width_mm, quantity, created_by)
      values (${robot}, ${art.revisionId}, ${pvc}, false, 'left', 40, 1, ${p.mentor})`)).toMatch(/check/)
    expect(await refused(trx, sql`insert into placement (robot_id, revision_id, film_id, film_cleared, spot, width_mm, quantity, created_by)
      values (${robot}, ${art.revisionId}, ${pvc}, null, 'left', 40, 1, ${p.mentor})`)).toMatch(/film_cleared = true/)
    expect(await refused(trx, sql`insert into job (placement_id, kind, quantity, film_id, film_cleared, width_mm, created_by)
      values (${placement}, 'reprint', 1, ${pvc}, null, 40, ${p.mentor})`)).toMatch(/film_cleared = true/)
    // A row that has its key cannot lose it, nor move to such a film.
    expect(await refused(trx, sql`update placement set film_cleared = null where id = ${placement}`)).toMatch(/film_cleared = true/)
    expect(await refused(trx, sql`update placement set film_id = ${pvc} where id = ${placement}`)).toMatch(/placement_film_cleared/)
    expect(await refused(trx, insertJob(p.films.pu))).toMatch(/job_film_cleared/)
    // The film's own cleared is generated, never written.
    expect(await refused(trx, sql`update film set cleared = true where id = ${pvc}`)).toMatch(/can only be updated to DEFAULT/)
    expect(await refused(trx, sql`update film set polymer_verdict = 'allowed' where id = ${pvc}`)).toMatch(/film_polymer/)
  })
})

describe('the mixed case: "PVC-free vinyl" is polyurethane', () => {
  test('ask the lab: cut only once a mentor\'s approval is recorded with who, when and the safety data sheet', async ({ trx }) => {
    const { p, insertPlacement, insertJob } = await arrange(trx)
    for (const typed of ['PVC-free vinyl', 'pvc free vinyl', 'PVCFREE VINYL', 'Non-PVC vinyl', 'chlorine-free vinyl']) expect(matchPolymer(typed)?.code, typed).toBe('PU')
    const pu = p.films.pu
    expect(await refused(trx, insertPlacement(pu))).toMatch(/placement_film_cleared/)
    expect(await refused(trx, insertJob(pu))).toMatch(/job_film_cleared/)
    // The approval is whole or absent: who, when and the data sheet.
    expect(await refused(trx, sql`update film set lab_approved_at = now() where id = ${pu}`)).toMatch(/film_lab_approval_whole/)
    expect(await refused(trx, sql`update film set lab_approved_by = ${p.mentor}, lab_approved_at = now(), lab_approval_sds = '  ' where id = ${pu}`)).toMatch(/film_lab_approval_whole/)
    await sql`update film set lab_approved_by = ${p.mentor}, lab_approved_at = now(), lab_approval_sds = 'Maker X PU film SDS rev. 3' where id = ${pu}`.execute(trx)
    expect((await trx.selectFrom('film').select('cleared').where('id', '=', pu).executeTakeFirstOrThrow()).cleared).toBe(true)
    await insertPlacement(pu).execute(trx)
    await insertJob(pu).execute(trx)
    // In use, the approval stays: withdrawing it, or choosing another polymer (which clears the approval), is refused.
    expect(await refused(trx, sql`update film set lab_approved_by = null, lab_approved_at = null, lab_approval_sds = null where id = ${pu}`)).toMatch(/_film_cleared/)
    expect(await refused(trx, sql`update film set polymer_code = 'PC', polymer_verdict = 'ask-the-lab' where id = ${pu}`)).toMatch(/_film_cleared/)
  })

  test('another polymer, or a new verdict from the register, needs a new approval', async ({ trx }) => {
    const p = await buildProgram(trx)
    const film = await addFilm(trx, p.id, { name: 'Unused PU', polymer: 'PU' })
    await sql`update film set lab_approved_by = ${p.mentor}, lab_approved_at = now(), lab_approval_sds = 'SDS' where id = ${film}`.execute(trx)
    await sql`update film set polymer_code = 'PC', polymer_verdict = 'ask-the-lab' where id = ${film}`.execute(trx)
    const after = await trx.selectFrom('film').select(['lab_approved_at', 'cleared']).where('id', '=', film).executeTakeFirstOrThrow()
    expect(after).toEqual({ lab_approved_at: null, cleared: false })
    // The register's verdict reaches the film through its key (ON UPDATE CASCADE).
    await sql`update polymer set verdict = 'allowed' where code = 'PC'`.execute(trx)
    expect(await trx.selectFrom('film').select(['polymer_verdict', 'cleared']).where('id', '=', film).executeTakeFirstOrThrow()).toEqual({ polymer_verdict: 'allowed', cleared: true })
  })
})
