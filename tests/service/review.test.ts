import { describe, expect } from 'vitest'
import { findRevision } from '../../server/artworks/queries'
import { reviewQueue, reviewRevision, submitRevision } from '../../server/review/service'
import { historyOf } from '../../server/history/service'
import { deliverDueMail } from '../../server/platform/mail'
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
    const queued = await mail.queued(p.id)
    expect(queued.map((m) => m.subject)).toEqual([expect.stringMatching(/Review requested: Gear badge/)])
    expect(queued[0]!.to).toEqual([p.emails.get(p.mentor)])
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
    const queued = await mail.queued(p.id)
    expect(queued.map((m) => [m.to[0], m.subject.split(':')[0]])).toEqual([[p.emails.get(team.designer), 'Approved'], [p.emails.get(team.designer), 'Sent back']])
    expect(queued[1]!.text).toContain('Thicken the ring.')
    expect((await trx.selectFrom('artwork').select('status').where('id', '=', one.id).executeTakeFirstOrThrow()).status).toBe('approved')
    // Locked: no second decision, and the queue is empty again.
    expect(await statusOf(reviewRevision(trx, mentor, (await findRevision(trx, mentor, one.revisionId))!, { decision: 'send-back', comment: 'No.' }))).toBe(409)
    expect((await reviewQueue(trx, mentor, { limit: 10 })).items).toEqual([])
  })

  test('a mail server that is down does not stop the decision: the message waits in the outbox and goes out later', async ({ trx, mail }) => {
    const p = await buildProgram(trx)
    const team = p.teams[0]
    const mentor = await actorOf(trx, p.mentor)
    const art = await addArtwork(trx, { teamId: team.id, authorId: team.student, status: 'in-review' })
    mail.fail(true)
    await reviewRevision(trx, mentor, (await findRevision(trx, mentor, art.revisionId))!, { decision: 'approve', comment: '' })
    expect((await findRevision(trx, mentor, art.revisionId))!.status).toBe('approved')
    await deliverDueMail(trx, { retryBaseMs: 60_000 })
    const waiting = await trx.selectFrom('mail_outbox').selectAll().where('program_id', '=', p.id).execute()
    expect(waiting).toHaveLength(1)
    expect(waiting[0]).toMatchObject({ attempts: 1, sent_at: null, last_error: expect.stringMatching(/made the mail server fail/) })
    // The next try waits (about a minute here), then succeeds once the server is back.
    expect(new Date(waiting[0]!.next_attempt_at).getTime()).toBeGreaterThan(Date.now() + 50_000)
    mail.fail(false)
    await trx.updateTable('mail_outbox').set({ next_attempt_at: new Date(0) }).where('id', '=', waiting[0]!.id).execute()
    await deliverDueMail(trx, { retryBaseMs: 60_000 })
    const row = await trx.selectFrom('mail_outbox').selectAll().where('id', '=', waiting[0]!.id).executeTakeFirstOrThrow()
    expect(row).toMatchObject({ attempts: 2, last_error: null })
    expect(row.sent_at).not.toBeNull()
    expect(mail.sent.filter((m) => m.to[0] === row.to_email).map((m) => m.subject)).toEqual([expect.stringMatching(/^Approved/)])
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
