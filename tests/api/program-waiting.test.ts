// The mentor's "Waiting for you": counted for their own program only, from the database.
import { describe, expect, it } from 'vitest'
import { hashPassword } from '../../server/platform/passwords'
import { signedIn } from '../support/client'
import { testDb } from '../support/db'
import { addArtwork, addRobot, buildProgram } from '../support/fixtures'

describe('what waits for a mentor', () => {
  it('counts reviews, queued and blocked jobs, low films and bare robots of their program alone', async () => {
    const db = testDb()
    const password = 'fixture-password-123'
    const p = await buildProgram(db, { passwordHash: await hashPassword(password) })
    const [a] = p.teams
    const mentor = await signedIn(p.emails.get(p.mentor)!, password)

    // An empty program: nothing waits (the demo program's work is not counted here).
    const empty = await mentor.get('/api/program/waiting')
    expect(empty.status).toBe(200)
    expect(empty.body).toMatchObject({ toReview: 0, jobsQueued: 0, jobsBlocked: [], robotsBare: [] })
    // Twenty sheets of the PET film, none of the others usable: nothing is low.
    expect(empty.body.filmsLow).toEqual([])

    await addArtwork(db, { teamId: a.id, authorId: a.student, status: 'in-review' })
    await addArtwork(db, { teamId: a.id, authorId: a.student, status: 'in-review' })
    const approved = await addArtwork(db, { teamId: a.id, authorId: a.designer, status: 'approved' })
    const dressed = await addRobot(db, a.id, 'Dressed robot')
    const bare = await addRobot(db, a.id, 'Bare robot')
    const placed = await mentor.post('/api/placements', { robotId: dressed, revisionId: approved.revisionId, filmId: p.films.pet, spot: 'front', widthMm: 60, quantity: 2, spares: 0 })
    expect(placed.status).toBe(201)
    const jobId = placed.body.jobs[0].id as number
    // The shelf runs empty: the job cannot be cut and the film is low.
    await db.updateTable('film').set({ sheets_on_hand: 0 }).where('id', '=', p.films.pet).execute()

    const w = (await mentor.get('/api/program/waiting')).body
    expect(w.toReview).toBe(2)
    expect(w.jobsQueued).toBe(1)
    expect(w.jobsBlocked).toEqual([{ jobId, title: approved.title, robot: 'Dressed robot', reason: expect.stringMatching(/needs 1 sheet of Fixture PET film; 0 left/) }])
    expect(w.filmsLow).toEqual([{ filmId: p.films.pet, name: 'Fixture PET film', onHand: 0, needed: 1 }])
    expect(w.robotsBare).toEqual([{ robotId: bare, name: 'Bare robot', team: a.name }])
  })

  it('is for mentors only', async () => {
    const db = testDb()
    const password = 'fixture-password-123'
    const p = await buildProgram(db, { passwordHash: await hashPassword(password) })
    const student = await signedIn(p.emails.get(p.teams[0].student)!, password)
    expect((await student.get('/api/program/waiting')).status).toBe(403)
  })
})
