// Mail through a transactional outbox: a change writes its messages into `mail_outbox` in its
// own transaction, so a message goes out only for a change that committed and is never lost
// when the SMTP server is down; a sender (one per app process, safe side by side) delivers
// what is due after commit, with retries and a growing wait.
import nodemailer, { type Transporter } from 'nodemailer'
import { sql } from 'kysely'
import type { Db } from './db'
import { platformConfig } from './config'

let transport: Transporter | undefined

function useTransport(): Transporter {
  const config = platformConfig()
  if (config.mailTransport) return config.mailTransport
  if (!transport) {
    if (!config.smtpUrl) throw new Error('NUXT_SMTP_URL is not set: the app needs an SMTP server to send mail.')
    // A stalled server must not hold a delivery for ever.
    transport = nodemailer.createTransport(config.smtpUrl, { connectionTimeout: 10_000, greetingTimeout: 10_000, socketTimeout: 30_000 } as never)
  }
  return transport
}

export interface OutgoingMail {
  to: string | string[]
  subject: string
  text: string
  html: string
}

/** Writes a message into the outbox, one row per recipient; pass the change's transaction. */
export async function queueMail(db: Db, programId: number | null, mail: OutgoingMail): Promise<void> {
  const to = [mail.to].flat().filter(Boolean)
  if (!to.length) return
  await db.insertInto('mail_outbox').values(to.map((address) => ({
    program_id: programId, to_email: address, subject: mail.subject, text: mail.text, html: mail.html,
  }))).execute()
}

export function absoluteUrl(path: string): string {
  return new URL(path, platformConfig().baseUrl).toString()
}

/** How long a claimed message is left to one sender before another may try it. */
const LEASE_MS = 2 * 60 * 1000
const MAX_WAIT_MS = 15 * 60 * 1000

/** The wait before the next try after `attempts` failures: base, 2 × base, 4 × base … at most 15 minutes. */
export function retryDelayMs(attempts: number, baseMs: number): number {
  return Math.min(MAX_WAIT_MS, baseMs * 2 ** Math.max(0, attempts - 1))
}

/**
 * Delivers the messages whose time has come. Each is claimed first (its next try moved past a
 * lease, in one statement that skips rows another sender holds), so two app processes never
 * send the same message twice at once. Returns how many went out.
 */
export async function deliverDueMail(db: Db, o: { batch?: number; retryBaseMs: number }): Promise<number> {
  const claimed = await sql<{ id: number; to_email: string; subject: string; text: string; html: string; attempts: number }>`
    update mail_outbox set attempts = attempts + 1, next_attempt_at = now() + ${`${LEASE_MS} milliseconds`}::interval
    where id in (
      select id from mail_outbox where sent_at is null and next_attempt_at <= now()
      order by next_attempt_at, id limit ${o.batch ?? 20} for update skip locked)
    returning id, to_email, subject, text, html, attempts`.execute(db)
  let sent = 0
  for (const m of claimed.rows) {
    try {
      await useTransport().sendMail({ from: platformConfig().mailFrom, to: m.to_email, subject: m.subject, text: m.text, html: m.html })
      await db.updateTable('mail_outbox').set({ sent_at: new Date(), last_error: null }).where('id', '=', m.id).execute()
      sent++
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err)
      await db.updateTable('mail_outbox')
        .set({ last_error: message.slice(0, 500), next_attempt_at: new Date(Date.now() + retryDelayMs(m.attempts, o.retryBaseMs)) })
        .where('id', '=', m.id).execute()
    }
  }
  return sent
}

/** Runs the sender every `intervalMs` until stopped; errors (a database that is away) are logged and tried again. */
export function startMailSender(db: Db, o: { intervalMs: number; retryBaseMs: number }): () => void {
  let stopped = false
  let timer: NodeJS.Timeout | undefined
  const tick = async () => {
    try {
      // Keep going while full batches come back, so a backlog drains quickly.
      while (!stopped && (await deliverDueMail(db, { retryBaseMs: o.retryBaseMs })) >= 20) { /* next batch */ }
    } catch (err) {
      console.error('[decalwright] mail sender:', err instanceof Error ? err.message : err)
    }
    if (!stopped) timer = setTimeout(tick, o.intervalMs)
  }
  timer = setTimeout(tick, o.intervalMs)
  return () => {
    stopped = true
    clearTimeout(timer)
  }
}
