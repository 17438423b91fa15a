// What the outbox shows people: each person's own messages (only while the local mail fake
// stands in for delivery, so nobody can read another person's one-time links), and, for a
// program's mentors, the messages that are waiting or failing.
import { sql } from 'kysely'
import type { MailMessage, MailSummary, OutboxStatus } from '#shared/types/api'
import type { Db } from '../platform/db'
import { platformConfig } from '../platform/config'
import type { Actor } from '../policy'

/** Whether the local SMTP fake stands in for delivery (NUXT_MAIL_OUTBOX_DIR is set). */
export function mailFakeInUse(): boolean {
  return !!platformConfig().mailOutboxDir
}

function ownMail(db: Db, actor: Actor) {
  return db.selectFrom('mail_outbox').where(sql<boolean>`lower(to_email) = lower(${actor.email})`)
}

function summary(r: { id: number; created_at: Date; to_email: string; subject: string }): MailSummary {
  return { id: String(r.id), date: new Date(r.created_at).toISOString(), from: platformConfig().mailFrom, to: r.to_email, subject: r.subject }
}

/** The actor's own messages, newest first. */
export async function listInbox(db: Db, actor: Actor, limit = 200): Promise<MailSummary[]> {
  const rows = await ownMail(db, actor).select(['id', 'created_at', 'to_email', 'subject']).orderBy('id', 'desc').limit(limit).execute()
  return rows.map(summary)
}

/** One of the actor's own messages; undefined for anyone else's. */
export async function inboxMessage(db: Db, actor: Actor, id: number): Promise<MailMessage | undefined> {
  const r = await ownMail(db, actor).select(['id', 'created_at', 'to_email', 'subject', 'text', 'html']).where('id', '=', id).executeTakeFirst()
  return r && { ...summary(r), text: r.text, html: r.html }
}

/** The program's messages not yet delivered: how many wait, and those whose delivery failed, with why. */
export async function outboxStatus(db: Db, actor: Actor): Promise<OutboxStatus> {
  const waiting = db.selectFrom('mail_outbox').where('program_id', '=', actor.programId).where('sent_at', 'is', null)
  const [{ n }, failing] = await Promise.all([
    waiting.select(sql<number>`count(*)::int`.as('n')).executeTakeFirstOrThrow(),
    waiting.where('last_error', 'is not', null)
      .select(['id', 'to_email', 'subject', 'attempts', 'last_error', 'next_attempt_at', 'created_at'])
      .orderBy('id').limit(50).execute(),
  ])
  return {
    waiting: n,
    failing: failing.map((r) => ({
      id: r.id, to: r.to_email, subject: r.subject, attempts: r.attempts, lastError: r.last_error ?? '',
      nextAttemptAt: new Date(r.next_attempt_at).toISOString(), createdAt: new Date(r.created_at).toISOString(),
    })),
  }
}
