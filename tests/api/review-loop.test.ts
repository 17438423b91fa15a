// The review loop as the people in it see it: who hears of a decision, what a reviewer is told
// about later revisions, the comment of a send-back, each revision's own status, and where an
// artwork's decals are.
import { describe, expect, it } from 'vitest'
import { allPages, signedIn } from '../support/client'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { drawing } from '../support/images'
import { waitForMail } from '../support/mail'
import { approvedOnRobot, teamId } from '../support/scenario'
import { uploadArtwork } from '../support/upload'

describe('the review loop', () => {
  it('tells both the author and the student who submitted; the reviewer learns of newer revisions; the comment stays on the artwork', async () => {
    const designer = await signedIn(DEMO_ACCOUNTS.designer.email, DEMO_PASSWORD)
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const mentor = await signedIn(DEMO_ACCOUNTS.mentor.email, DEMO_PASSWORD)
    const title = `Loop heron ${Date.now()}`
    const up = await uploadArtwork(designer, { file: await drawing('png', 500, 300), title, teamId: await teamId(), widthMm: 70 })
    expect(up.status).toBe(201)
    const r1 = up.body.revision.id as number
    const artworkId = up.body.artwork.id as number

    // The designer made it; the student submits it and is told they will hear.
    expect((await student.post(`/api/revisions/${r1}/submit`)).status).toBe(200)
    const comment = 'The beak is thinner than the film allows; thicken it a little.'
    expect((await mentor.post(`/api/revisions/${r1}/review`, { decision: 'send-back', comment })).status).toBe(200)
    for (const who of [DEMO_ACCOUNTS.designer.email, DEMO_ACCOUNTS.student.email]) {
      const mail = await waitForMail(who, new RegExp(`Sent back: ${title}`))
      expect(mail.text).toContain(comment)
    }

    // The designer makes revision 2; the list shows revision 2 with its own status, not revision 1's.
    const r2 = await designer.post(`/api/artworks/${artworkId}/revisions`, { settings: {}, widthMm: 75 })
    expect(r2.status, JSON.stringify(r2.body)).toBe(201)
    const listed = (await allPages(student, '/api/artworks')).find((a: { id: number }) => a.id === artworkId)
    expect(listed.status).toBe('sent-back')
    expect(listed.latestRevision).toMatchObject({ number: 2, status: 'draft' })

    // The artwork carries the send-back and its comment, whichever revision is latest.
    const detail = (await student.get(`/api/artworks/${artworkId}`)).body
    expect(detail.lastDecision).toMatchObject({ decision: 'send-back', comment, by: DEMO_ACCOUNTS.mentor.name, revisionNumber: 1 })

    // Revision 1 submitted again: its review card says a newer revision exists.
    expect((await student.post(`/api/revisions/${r1}/submit`)).status).toBe(200)
    const card = (await allPages(mentor, '/api/reviews')).find((c: { revisionId: number }) => c.revisionId === r1)
    expect(card).toMatchObject({ number: 1, newerRevisions: 1, latestNumber: 2 })
  })

  it('the artwork lists every robot, spot, film and job its decal is placed on', async () => {
    const { mentor, student, artworkId, revisionId, robotId, film } = await approvedOnRobot('Placed owl')
    const before = (await student.get(`/api/artworks/${artworkId}`)).body
    expect(before.placements).toEqual([])
    const placed = await mentor.post('/api/placements', { robotId, revisionId, filmId: film.id, spot: 'rear shield', widthMm: 45, quantity: 2, spares: 1 })
    expect(placed.status, JSON.stringify(placed.body)).toBe(201)
    const after = (await student.get(`/api/artworks/${artworkId}`)).body
    expect(after.placements).toEqual([expect.objectContaining({
      id: placed.body.id, spot: 'rear shield', widthMm: 45, quantity: 2, spares: 1, revisionNumber: 1,
      robot: expect.objectContaining({ id: robotId }), film: { id: film.id, name: film.name },
      jobs: [{ id: placed.body.jobs[0].id, kind: 'initial', state: 'queued', quantity: 3 }],
    })])
    // A removed placement is no longer where the decal is.
    const removed = await mentor.request('DELETE', `/api/placements/${placed.body.id}`, { reason: 'robot rebuilt' })
    expect(removed.status, JSON.stringify(removed.body)).toBeLessThan(300)
    expect((await student.get(`/api/artworks/${artworkId}`)).body.placements).toEqual([])
  })
})
