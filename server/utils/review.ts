import type { H3Event } from 'h3'
import type { Transaction } from 'kysely'
import type { Database } from '../db/schema'
import type { ArtworkStatus } from '#shared/types/artworks'
import type { Actor } from './actor'
import { decisionMail, reviewRequestMail } from '../mail/templates'

function revisionUrl(artworkId: number, number: number): string {
  return absoluteUrl(`/artworks/${artworkId}?r=${number}`)
}

/** The revision's status, locked for the rest of the transaction so two reviewers cannot race. */
async function lockedStatus(trx: Transaction<Database>, revisionId: number): Promise<ArtworkStatus> {
  const row = await trx.selectFrom('revision_status').select('status').where('revision_id', '=', revisionId).forUpdate().executeTakeFirstOrThrow()
  return row.status as ArtworkStatus
}

/** A student or designer asks the mentors to look at a revision. */
export async function submitRevision(event: H3Event, actor: Actor, revisionId: number): Promise<void> {
  const rev = await findRevision(actor, revisionId)
  if (!canActInTeam(actor, rev.team_id, 'student')) throw createError({ statusCode: 403, message: 'Only the team’s students and designers may submit this revision.' })
  const db = useDb()
  const team = await db.selectFrom('team').select('name').where('id', '=', rev.team_id).executeTakeFirstOrThrow()
  const mentors = await db.selectFrom('mentorship').innerJoin('users', 'users.id', 'mentorship.user_id')
    .select('users.email').where('mentorship.program_id', '=', actor.programId).where('users.active', '=', true).execute()
  await db.transaction().execute(async (trx) => {
    const status = await lockedStatus(trx, revisionId)
    if (status !== 'draft' && status !== 'sent-back') {
      throw createError({ statusCode: 409, message: status === 'approved' ? 'This revision is approved already.' : 'This revision is already in review.' })
    }
    await trx.updateTable('revision_status').set({ status: 'in-review', updated_at: new Date(), updated_by: actor.id }).where('revision_id', '=', revisionId).execute()
    await trx.updateTable('artwork').set({ status: 'in-review', updated_at: new Date() }).where('id', '=', rev.artwork_id).execute()
    await trx.insertInto('review_event').values({ revision_id: revisionId, actor_id: actor.id, action: 'submit' }).execute()
    await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'submit', subjectType: 'artwork', subjectId: rev.artwork_id, detail: { title: rev.title, revision: rev.number } })
    if (mentors.length) {
      await sendMail(reviewRequestMail({ to: mentors.map((m) => m.email), author: actor.name, title: rev.title, team: team.name, number: rev.number, url: revisionUrl(rev.artwork_id, rev.number) }))
    }
  })
}

/** A mentor approves (and so locks) a revision in review, or sends it back with a comment. */
export async function reviewRevision(event: H3Event, actor: Actor, revisionId: number, input: { decision: 'approve' | 'send-back'; comment: string }): Promise<void> {
  const rev = await findRevision(actor, revisionId)
  const author = await useDb().selectFrom('users').select(['email', 'name', 'active']).where('id', '=', rev.author_id).executeTakeFirstOrThrow()
  await useDb().transaction().execute(async (trx) => {
    const status = await lockedStatus(trx, revisionId)
    if (status !== 'in-review') throw createError({ statusCode: 409, message: status === 'approved' ? 'This revision is approved and locked.' : 'Only a revision in review can be approved or sent back.' })
    const next: ArtworkStatus = input.decision === 'approve' ? 'approved' : 'sent-back'
    await trx.updateTable('revision_status').set({ status: next, updated_at: new Date(), updated_by: actor.id }).where('revision_id', '=', revisionId).execute()
    await trx.updateTable('artwork').set({ status: next, updated_at: new Date() }).where('id', '=', rev.artwork_id).execute()
    await trx.insertInto('review_event').values({ revision_id: revisionId, actor_id: actor.id, action: input.decision, comment: input.comment }).execute()
    await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: input.decision, subjectType: 'artwork', subjectId: rev.artwork_id, detail: { title: rev.title, revision: rev.number, comment: input.comment } })
    if (author.active) {
      await sendMail(decisionMail({ to: author.email, name: author.name, title: rev.title, number: rev.number, decision: input.decision, reviewer: actor.name, comment: input.comment, url: revisionUrl(rev.artwork_id, rev.number) }))
    }
  })
}

export async function reviewHistory(revisionId: number) {
  const rows = await useDb().selectFrom('review_event').innerJoin('users', 'users.id', 'review_event.actor_id')
    .select(['review_event.id', 'review_event.action', 'review_event.comment', 'review_event.at', 'users.name'])
    .where('review_event.revision_id', '=', revisionId).orderBy('review_event.id').execute()
  return rows.map((r) => ({ id: r.id, action: r.action, comment: r.comment, at: new Date(r.at).toISOString(), by: r.name }))
}

/** What waits for a mentor: every revision in review in the program, oldest first. */
export async function reviewQueue(actor: Actor) {
  const rows = await useDb().selectFrom('revision_status')
    .innerJoin('revision', 'revision.id', 'revision_status.revision_id')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('team', 'team.id', 'artwork.team_id')
    .innerJoin('users', 'users.id', 'revision.author_id')
    .select(['revision.id', 'revision.number', 'revision.measurements', 'revision.width_mm', 'revision.height_mm', 'artwork.id as artwork_id', 'artwork.title',
      'team.id as team_id', 'team.name as team_name', 'team.colour as team_colour', 'users.name as author', 'revision_status.updated_at'])
    .where('team.program_id', '=', actor.programId).where('revision_status.status', '=', 'in-review')
    .orderBy('revision_status.updated_at').execute()
  return rows.map((r) => ({
    revisionId: r.id, number: r.number, artworkId: r.artwork_id, title: r.title, author: r.author,
    team: { id: r.team_id, name: r.team_name, colour: r.team_colour },
    widthMm: r.width_mm, heightMm: r.height_mm, submittedAt: new Date(r.updated_at).toISOString(),
    vectorUrl: `/api/revisions/${r.id}/vector.svg`, measurements: r.measurements,
  }))
}
