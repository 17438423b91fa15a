// Review: a student or designer submits a revision; a mentor approves (and so locks) it or
// sends it back with a comment. Everyone concerned is mailed through the outbox, written in
// the same transaction.
import { createError } from 'h3'
import { z } from 'zod'
import type { ArtworkStatus, RevisionDetail, ReviewQueueItem } from '#shared/types/artworks'
import type { Page } from '#shared/types/api'
import { decodeCursor, pageOf } from '../platform/cursor'
import { inTransaction, type Db } from '../platform/db'
import { absoluteUrl, queueMail } from '../platform/mail'
import type { Actor } from '../policy'
import { audit, by } from '../history/service'
import { decisionMail, reviewRequestMail } from '../mail/templates'
import { findRevision, type RevisionRow } from '../artworks/queries'
import { revisionDetail } from '../artworks/service'
import { activeMentorEmails, decisionRecipients, inReview, lockedStatus } from './queries'

function revisionUrl(artworkId: number, number: number): string {
  return absoluteUrl(`/artworks/${artworkId}?r=${number}`)
}

/** The caller has found the revision in the actor's scope and checked `revision.submit`. */
export async function submitRevision(db: Db, actor: Actor, rev: RevisionRow): Promise<RevisionDetail> {
  return inTransaction(db, async (trx) => {
    const status = await lockedStatus(trx, rev.id)
    if (status !== 'draft' && status !== 'sent-back') {
      throw createError({ statusCode: 409, message: status === 'approved' ? 'This revision is approved already.' : 'This revision is already in review.' })
    }
    await trx.updateTable('revision_status').set({ status: 'in-review', updated_at: new Date(), updated_by: actor.id }).where('revision_id', '=', rev.id).execute()
    await trx.updateTable('artwork').set({ status: 'in-review', updated_at: new Date() }).where('id', '=', rev.artwork_id).execute()
    await trx.insertInto('review_event').values({ revision_id: rev.id, actor_id: actor.id, action: 'submit' }).execute()
    await audit(trx, { ...by(actor), action: 'submit', subject: 'artwork', subjectId: rev.artwork_id, detail: { title: rev.title, revision: rev.number } })
    const mentors = await activeMentorEmails(trx, actor.programId)
    if (mentors.length) {
      await queueMail(trx, actor.programId, reviewRequestMail({ to: mentors.map((m) => m.email), author: actor.name, title: rev.title, team: rev.team_name, number: rev.number, url: revisionUrl(rev.artwork_id, rev.number) }))
    }
    return revisionDetail(trx, (await findRevision(trx, actor, rev.id))!)
  })
}

/** A mentor's decision on a revision in review. The caller has found the revision in the actor's scope. */
export async function reviewRevision(db: Db, actor: Actor, rev: RevisionRow, input: { decision: 'approve' | 'send-back'; comment: string }): Promise<RevisionDetail> {
  return inTransaction(db, async (trx) => {
    const status = await lockedStatus(trx, rev.id)
    if (status !== 'in-review') throw createError({ statusCode: 409, message: status === 'approved' ? 'This revision is approved and locked.' : 'Only a revision in review can be approved or sent back.' })
    const next: ArtworkStatus = input.decision === 'approve' ? 'approved' : 'sent-back'
    await trx.updateTable('revision_status').set({ status: next, updated_at: new Date(), updated_by: actor.id }).where('revision_id', '=', rev.id).execute()
    await trx.updateTable('artwork').set({ status: next, updated_at: new Date() }).where('id', '=', rev.artwork_id).execute()
    await trx.insertInto('review_event').values({ revision_id: rev.id, actor_id: actor.id, action: input.decision, comment: input.comment }).execute()
    await audit(trx, { ...by(actor), action: input.decision, subject: 'artwork', subjectId: rev.artwork_id, detail: { title: rev.title, revision: rev.number, comment: input.comment } })
    // The revision's author and whoever submitted it (told on submitting that they would hear), each once.
    for (const person of await decisionRecipients(trx, rev.id, rev.author_id)) {
      await queueMail(trx, actor.programId, decisionMail({ to: person.email, name: person.name, title: rev.title, number: rev.number, decision: input.decision, reviewer: actor.name, comment: input.comment, url: revisionUrl(rev.artwork_id, rev.number) }))
    }
    return revisionDetail(trx, (await findRevision(trx, actor, rev.id))!)
  })
}

const queueCursor = z.object({ at: z.string().max(64), id: z.number().int().positive() })

/** What waits for a mentor: every revision in review in the program, oldest first. */
export async function reviewQueue(db: Db, actor: Actor, o: { cursor?: string; limit: number }): Promise<Page<ReviewQueueItem>> {
  const rows = await inReview(db, actor.programId, decodeCursor(o.cursor, queueCursor), o.limit + 1)
  return pageOf(rows, o.limit, (r) => ({
    revisionId: r.id, number: r.number, artworkId: r.artwork_id, title: r.title, author: r.author,
    team: { id: r.team_id, name: r.team_name, colour: r.team_colour },
    widthMm: r.width_mm, heightMm: r.height_mm, submittedAt: new Date(r.updated_at).toISOString(),
    vectorUrl: `/api/revisions/${r.id}/vector.svg`, measurements: r.measurements, layerCount: r.layer_count,
    newerRevisions: r.newer_count ?? 0, latestNumber: r.latest_number ?? r.number,
  }), (r) => ({ at: r.order_at, id: r.id }))
}
