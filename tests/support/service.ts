// Service tests: each test gets a transaction on the service project's own PostgreSQL that
// is rolled back afterwards; the mail the services write into the outbox is read back from it,
// and what the outbox's sender delivers is kept in memory.
import { inject, test as base } from 'vitest'
import nodemailer from 'nodemailer'
import type { Kysely, Transaction } from 'kysely'
import type { Database } from '../../server/db/schema'
import { createDb } from '../../server/db/connect'
import { configurePlatform } from '../../server/platform/config'
import { loadActor } from '../../server/auth/service'
import type { Actor } from '../../server/policy'

export interface SentMail { to: string[]; subject: string; text: string }

// The cut sheets' worker bundled for this project (tests/setup/postgres.ts); the pool looks here first.
process.env.DECALWRIGHT_CUTSHEET_WORKER = inject('cutSheetWorker')

const outbox: SentMail[] = []
let failMail = false

// No database URL on purpose: a service that reached for useDb() instead of the transaction it
// was given fails loudly here rather than quietly taking a second connection.
configurePlatform({
  databaseUrl: '',
  s3: { endpoint: 'http://127.0.0.1:9', region: 'us-east-1', bucket: 'none', accessKeyId: 'none', secretAccessKey: 'none', forcePathStyle: true },
  smtpUrl: '',
  mailFrom: 'Decalwright <decalwright@tests.example>',
  mailOutboxDir: '',
  baseUrl: 'http://decalwright.test',
  mailTransport: nodemailer.createTransport({
    name: 'memory',
    version: '1',
    send(mail, done) {
      if (failMail) return done(new Error('the test made the mail server fail'), undefined as never)
      const to = ([] as unknown[]).concat(mail.data.to ?? []).map(String)
      outbox.push({ to, subject: String(mail.data.subject ?? ''), text: String(mail.data.text ?? '') })
      done(null, { envelope: mail.message.getEnvelope(), messageId: `<${outbox.length}@tests.example>` } as never)
    },
  }),
})

let db: ReturnType<typeof createDb> | undefined
/** The service project's database; tests use the `trx` fixture, not this, unless they must commit. */
export function serviceDb() {
  db ??= createDb(inject('serviceDatabaseUrl'), 4)
  return db
}

class RolledBack extends Error {}

export interface MailFixture {
  /** The messages of one program written into the outbox, oldest first. */
  queued: (programId: number) => Promise<SentMail[]>
  /** What the sender delivered. */
  sent: SentMail[]
  /** Makes the in-memory mail server refuse every message (or accept them again). */
  fail: (on: boolean) => void
}

export const test = base.extend<{ trx: Transaction<Database>; mail: MailFixture }>({
  // eslint-disable-next-line no-empty-pattern
  trx: async ({}, use) => {
    await serviceDb().transaction().execute(async (trx) => {
      await use(trx)
      throw new RolledBack()
    }).catch((err) => {
      if (!(err instanceof RolledBack)) throw err
    })
  },
  mail: async ({ trx }, use) => {
    outbox.length = 0
    failMail = false
    const queued = async (programId: number) => (await trx.selectFrom('mail_outbox').select(['to_email', 'subject', 'text']).where('program_id', '=', programId).orderBy('id').execute())
      .map((r) => ({ to: [r.to_email], subject: r.subject, text: r.text }))
    await use({ queued, sent: outbox, fail: (on) => { failMail = on } })
    failMail = false
  },
})

/** The actor behind a user, as the app builds it for a request. */
export async function actorOf(db: Kysely<Database>, userId: number): Promise<Actor> {
  const actor = await loadActor(db, userId, '192.0.2.1')
  if (!actor) throw new Error(`user ${userId} is not active`)
  return actor
}

/** The HTTP status a service refused with (h3's createError), or 0 when it did not refuse. */
export async function statusOf(work: Promise<unknown>): Promise<number> {
  try {
    await work
    return 0
  } catch (err) {
    const status = (err as { statusCode?: number }).statusCode
    if (!status) throw err
    return status
  }
}
