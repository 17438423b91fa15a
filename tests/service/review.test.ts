import { describe, expect } from 'vitest'
import { findRevision } from '../../server/artworks/queries'
import { reviewQueue, reviewRevision, submitRevision } from '../../server/review/service'
import { historyOf } from '../../server/history/service'
import { actorOf, statusOf, test } from '../support/service'
import { addArtwork, buildProgram } from '../support/fixtures'

describe('review decisions', () => {
  test('a student submits: the revision waits in the queue, every mentor is mailed, the history says so', async ({ trx, mail }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, title: 'Gear badge' })
    const student = await actorOf(trx, team.student)
    const submitted = await submitRevision(trx, student, (await findRevision(trx, student, art.revisionId))!)
    expect(submitted.status).toBe('in-review')
    expect(submitted.reviews.map((r) => r.action)).toEqual(['submit'])
    expect(mail.sent.map((m) => m.subject)).toEqual([expect.stringMatching(/Review requested: Gear badge/)])
    expect(mail.sent[0]!.to).toEqual([p.emails.get(p.mentor)])
    const mentor = await actorOf(trx, p.mentor)
    expect((await reviewQueue(trx, mentor, { limit: 10 })).items.map((i) => i.revisionId)).toEqual([art.revisionId])
    expect((await historyOf(trx, mentor, { artworkId: art.id })).map((h) => [h.action, h.by])).toEqual([['submit', student.name]])
    // In review already: a second submit is refused.
    expect(await statusOf(submitRevision(trx, student, (await findRevision(trx, student, art.revisionId))!))).toBe(409)
  })

  test('a mentor approves and so locks it, or sends it back; the author is mailed each time', async ({ trx, mail }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const mentor = await actorOf(trx, p.mentor)
    const one = await addArtwork(trx, { teamId: team.id, authorId: team.designer, status: 'in-review', title: 'Plate one' })
    const two = await addArtwork(trx, { teamId: team.id, authorId: team.designer, status: 'in-review', title: 'Plate two' })
    const approved = await reviewRevision(trx, mentor, (await findRevision(trx, mentor, one.revisionId))!, { decision: 'approve', comment: 'Clean edges.' })
    expect(approved.status).toBe('approved')
    const back = await reviewRevision(trx, mentor, (await findRevision(trx, mentor, two.revisionId))!, { decision: 'send-back', comment: 'Thicken the ring.' })
    expect(back.status).toBe('sent-back')
    expect(mail.sent.map((m) => [m.to[0], m.subject.split(':')[0]])).toEqual([[p.emails.get(team.designer), 'Approved'], [p.emails.get(team.designer), 'Sent back']])
    expect(mail.sent[1]!.text).toContain('Thicken the ring.')
    expect((await trx.selectFrom('artwork').select('status').where('id', '=', one.id).executeTakeFirstOrThrow()).status).toBe('approved')
    // Locked: no second decision, and the queue is empty again.
    expect(await statusOf(reviewRevision(trx, mentor, (await findRevision(trx, mentor, one.revisionId))!, { decision: 'send-back', comment: 'No.' }))).toBe(409)
    expect((await reviewQueue(trx, mentor, { limit: 10 })).items).toEqual([])
  })

  test('a mail that cannot go out leaves the decision undone', async ({ trx, mail }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const mentor = await actorOf(trx, p.mentor)
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'in-review' })
    mail.fail(true)
    expect(await statusOf(reviewRevision(trx, mentor, (await findRevision(trx, mentor, art.revisionId))!, { decision: 'approve', comment: '' }))).toBe(502)
    expect((await findRevision(trx, mentor, art.revisionId))!.status).toBe('in-review')
    expect(await historyOf(trx, mentor, { artworkId: art.id })).toEqual([])
  })

  test('the review queue pages oldest first, for the mentor\'s own program only', async ({ trx }) => {
    const p = await buildProgram(trx)
    const far = await buildProgram(trx)
    const team = p.teams[1]
    const waiting = []
    for (let i = 0; i < 3; i++) waiting.push(await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'in-review' }))
    await addArtwork(trx, { teamId: far.teams[0].id, authorId: far.teams[0].student, status: 'in-review' })
    const mentor = await actorOf(trx, p.mentor)
    const first = await reviewQueue(trx, mentor, { limit: 2 })
    const second = await reviewQueue(trx, mentor, { limit: 2, cursor: first.nextCursor! })
    expect([...first.items, ...second.items].map((i) => i.revisionId)).toEqual(waiting.map((w) => w.revisionId))
    expect(second.nextCursor).toBeNull()
  })
})
