import { describe, expect, it, beforeAll } from 'vitest'
import { sql } from 'kysely'
import { allPages, ApiClient, signedIn } from '../support/client'
import { testDb } from '../support/db'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { drawing } from '../support/images'
import { mailTo, waitForMail } from '../support/mail'
import { uploadArtwork } from '../support/upload'

let student: ApiClient
let mentor: ApiClient
let wrens: number

beforeAll(async () => {
  wrens = (await testDb().selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()).id
  student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
  mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
})

async function newRevision(title: string) {
  const r = await uploadArtwork(student, { file: await drawing('png', 400, 300), title, teamId: wrens, widthMm: 60 })
  expect(r.status).toBe(201)
  return r.body.revision as { id: number; artworkId: number; number: number }
}

describe('review', () => {
  it('a student submits; every mentor is mailed; a mentor approves; the author is mailed; the revision is locked', async () => {
    const rev = await newRevision(`Number plate ${Date.now()}`)
    const submitted = await student.post(`/api/revisions/${rev.id}/submit`)
    expect(submitted.status, JSON.stringify(submitted.body)).toBe(200)
    expect(submitted.body.status).toBe('in-review')
    for (const m of [DEMO_ACCOUNTS.mentor.email, 'mentor2@harbourline.example']) {
      const mail = await waitForMail(m, /Review requested: Number plate/)
      expect(mail.text).toContain(`/artworks/${rev.artworkId}?r=1`)
    }
    expect((await student.post(`/api/revisions/${rev.id}/submit`)).status).toBe(409)
    const waiting = await allPages(mentor, '/api/reviews')
    expect(waiting.find((w: any) => w.revisionId === rev.id)).toMatchObject({ number: 1, author: DEMO_ACCOUNTS.student.name })
    expect((await student.get('/api/reviews')).status).toBe(403)
    expect((await student.post(`/api/revisions/${rev.id}/review`, { decision: 'approve' })).status).toBe(403)

    const approved = await mentor.post(`/api/revisions/${rev.id}/review`, { decision: 'approve', comment: 'Crisp edges, go ahead.' })
    expect(approved.status, JSON.stringify(approved.body)).toBe(200)
    expect(approved.body.status).toBe('approved')
    expect(approved.body.reviews.map((r: any) => r.action)).toEqual(['submit', 'approve'])
    const mail = await waitForMail(DEMO_ACCOUNTS.student.email, /Approved: Number plate/)
    expect(mail.text).toContain('Crisp edges, go ahead.')
    expect(mail.html).toContain('Open the revision')
    expect((await student.get(`/api/artworks/${rev.artworkId}`)).body.artwork.status).toBe('approved')

    // Locked: neither the API nor a hand-written SQL statement can change it.
    expect((await mentor.post(`/api/revisions/${rev.id}/review`, { decision: 'send-back', comment: 'Changed my mind' })).status).toBe(409)
    await expect(sql`update revision_status set status = 'draft' where revision_id = ${rev.id}`.execute(testDb())).rejects.toThrow(/locked/)
  })

  it('sending back needs a comment, and the author reads it', async () => {
    const rev = await newRevision(`Side badge ${Date.now()}`)
    await student.post(`/api/revisions/${rev.id}/submit`)
    const noComment = await mentor.post(`/api/revisions/${rev.id}/review`, { decision: 'send-back' })
    expect(noComment.status).toBe(400)
    expect(noComment.body.data.fieldErrors.comment).toEqual(['Say what to change when sending it back.'])
    const back = await mentor.post(`/api/revisions/${rev.id}/review`, { decision: 'send-back', comment: 'The thin ring will tear; thicken it.' })
    expect(back.body.status).toBe('sent-back')
    const mail = await waitForMail(DEMO_ACCOUNTS.student.email, /Sent back: Side badge/)
    expect(mail.text).toContain('The thin ring will tear; thicken it.')
    // A sent-back revision can be submitted again.
    expect((await student.post(`/api/revisions/${rev.id}/submit`)).body.status).toBe('in-review')
  })

  it('does not mail anyone for a refused action, and hides another team\'s revision', async () => {
    const rev = await newRevision(`Quiet ${Date.now()}`)
    const before = (await mailTo(DEMO_ACCOUNTS.mentor.email)).length
    expect((await mentor.post(`/api/revisions/${rev.id}/review`, { decision: 'approve' })).status).toBe(409)
    const other = await signedIn('tomasz@harbourline.example', DEMO_PASSWORD)
    expect((await other.post(`/api/revisions/${rev.id}/submit`)).status).toBe(404)
    expect((await mailTo(DEMO_ACCOUNTS.mentor.email)).length).toBe(before)
    expect((await new ApiClient().post(`/api/revisions/${rev.id}/submit`)).status).toBe(401)
  })
})

describe('film stock and the chlorine rule', () => {
  const film = {
    name: `Test orange polyester ${Date.now()}`, polymerCode: 'PET', colour: 'orange', colourHex: '#e07020', opacity: 'opaque',
    thicknessMm: 0.08, sheetWidthMm: 300, sheetHeightMm: 200, minFeatureMm: 0.8, laserPowerPct: 60, laserSpeedMmS: 10, laserPasses: 1,
  }

  it('lists the demo stock, with the PVC film marked unusable, the register\'s verdict and why', async () => {
    const films = (await student.get('/api/films')).body
    const pvc = films.find((f: any) => f.name === 'Glossy white sign vinyl')
    expect(pvc).toMatchObject({ chlorineFree: false, cleared: false, usable: false, polymer: { code: 'PVC', verdict: 'never', halogens: ['chlorine'] } })
    expect(pvc.notUsableBecause).toMatch(/hydrogen chloride/)
    expect(pvc.polymer.sources.length).toBeGreaterThan(0)
    expect(films.filter((f: any) => f.usable).length).toBeGreaterThanOrEqual(3)
  })

  it('a mentor adds and edits film; others may not; bad input gets field errors', async () => {
    expect((await student.post('/api/films', film)).status).toBe(403)
    const created = await mentor.post('/api/films', film)
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    expect(created.body).toMatchObject({ name: film.name, polymer: { code: 'PET' }, colourHex: '#e07020', usable: true, cleared: true })
    const patched = await mentor.patch(`/api/films/${created.body.id}`, { laserPasses: 2, retired: true })
    expect(patched.body).toMatchObject({ laserPasses: 2, retired: true, usable: false })
    const bad = await mentor.post('/api/films', { ...film, name: '', laserPowerPct: 140 })
    expect(bad.status).toBe(400)
    expect(Object.keys(bad.body.data.fieldErrors).sort()).toEqual(['laserPowerPct', 'name'])
  })

  it('the database itself refuses a placement or a job on film the register does not clear', async () => {
    const db = testDb()
    const rev = await newRevision(`Chlorine check ${Date.now()}`)
    await student.post(`/api/revisions/${rev.id}/submit`)
    await mentor.post(`/api/revisions/${rev.id}/review`, { decision: 'approve' })
    const robot = await db.insertInto('robot').values({ team_id: wrens, name: `Test bot ${Date.now()}`, season: '2026–27' }).returning('id').executeTakeFirstOrThrow()
    const pvc = await db.selectFrom('film').select('id').where('name', '=', 'Glossy white sign vinyl').executeTakeFirstOrThrow()
    const pet = await db.selectFrom('film').select('id').where('name', '=', 'Matte black polyester film').executeTakeFirstOrThrow()
    const userId = (await db.selectFrom('users').select('id').where('email', '=', DEMO_ACCOUNTS.mentor.email).executeTakeFirstOrThrow()).id

    // A hand-written SQL insert, bypassing every form and route:
    await expect(sql`insert into placement (robot_id, revision_id, film_id, spot, width_mm, quantity, created_by)
      values (${robot.id}, ${rev.id}, ${pvc.id}, 'left side panel', 60, 1, ${userId})`.execute(db)).rejects.toThrow(/placement_film_cleared/)
    // …nor by claiming the film is cleared in the row itself:
    await expect(sql`insert into placement (robot_id, revision_id, film_id, film_cleared, spot, width_mm, quantity, created_by)
      values (${robot.id}, ${rev.id}, ${pvc.id}, false, 'left side panel', 60, 1, ${userId})`.execute(db)).rejects.toThrow(/check/)
    const ok = await sql<{ id: number }>`insert into placement (robot_id, revision_id, film_id, spot, width_mm, quantity, created_by)
      values (${robot.id}, ${rev.id}, ${pet.id}, 'left side panel', 60, 1, ${userId}) returning id`.execute(db)
    const placementId = ok.rows[0]!.id
    await expect(sql`insert into job (placement_id, kind, quantity, film_id, width_mm, created_by) values (${placementId}, 'reprint', 1, ${pvc.id}, 60, ${userId})`.execute(db)).rejects.toThrow(/job_film_cleared/)
    // A film in use cannot become one the register refuses afterwards.
    await expect(sql`update film set polymer_code = 'PVC', polymer_verdict = 'never' where id = ${pet.id}`.execute(db)).rejects.toThrow(/violates foreign key/)
    // And only approved revisions go on a robot.
    const draft = await newRevision(`Not approved ${Date.now()}`)
    await expect(sql`insert into placement (robot_id, revision_id, film_id, spot, width_mm, quantity, created_by)
      values (${robot.id}, ${draft.id}, ${pet.id}, 'front', 60, 1, ${userId})`.execute(db)).rejects.toThrow(/not approved/)
  })
})

describe('the laser work area', () => {
  it('a mentor records it and everyone reads it from /api/me; others may not change it', async () => {
    expect((await student.get('/api/me')).body.program.laserWorkArea).toEqual({ widthMm: 400, heightMm: 400 })
    expect((await student.patch('/api/program', { laserWorkArea: { widthMm: 300, heightMm: 200 } })).status).toBe(403)
    const bad = await mentor.patch('/api/program', { laserWorkArea: { widthMm: -1, heightMm: 200 } })
    expect(bad.status).toBe(400)
    expect((await mentor.patch('/api/program', { laserWorkArea: { widthMm: 500, heightMm: 300 } })).status).toBe(200)
    expect((await student.get('/api/me')).body.program.laserWorkArea).toEqual({ widthMm: 500, heightMm: 300 })
    expect((await mentor.patch('/api/program', { laserWorkArea: { widthMm: 400, heightMm: 400 } })).status).toBe(200)
  })
})
