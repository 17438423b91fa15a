// Brings up everything the app needs next to it and returns the NUXT_* environment for it.
import path from 'node:path'
import { mkdirSync } from 'node:fs'
import { startPostgres, startS3, startSmtpFake, sessionSecret } from './services'

export interface StackOptions {
  storageDir: string
  pgPort: number
  s3Port: number
  smtpPort: number
  env: NodeJS.ProcessEnv
}

/** The NUXT_* variables for the stand-ins that were started (a configured service sets none). */
export type StackEnv = Record<string, string> & Partial<Record<'NUXT_DATABASE_URL' | 'NUXT_S3_ENDPOINT' | 'NUXT_SMTP_URL' | 'NUXT_MAIL_OUTBOX_DIR', string>>

export interface Stack {
  env: StackEnv
  /** Lines that say where everything is. */
  summary: string[]
  stop: () => Promise<void>
}

export async function startStack(o: StackOptions): Promise<Stack> {
  mkdirSync(o.storageDir, { recursive: true })
  const env: StackEnv = {}
  const summary: string[] = []
  const stops: (() => Promise<void>)[] = []
  const stop = async () => {
    for (const s of stops.reverse()) await s().catch(() => {})
  }
  try {
    if (o.env.NUXT_DATABASE_URL) {
      summary.push('PostgreSQL      configured: NUXT_DATABASE_URL')
    } else {
      const pgHandle = await startPostgres({ dir: path.join(o.storageDir, 'postgres'), port: o.pgPort })
      stops.push(pgHandle.stop)
      env.NUXT_DATABASE_URL = pgHandle.url
      summary.push(`PostgreSQL      127.0.0.1:${o.pgPort}, data in ${path.join(o.storageDir, 'postgres')}`)
    }
    if (o.env.NUXT_S3_ENDPOINT || o.env.NUXT_S3_ACCESS_KEY_ID) {
      summary.push(`Object storage  configured: bucket ${o.env.NUXT_S3_BUCKET ?? 'decalwright'}`)
    } else {
      const bucket = o.env.NUXT_S3_BUCKET ?? 'decalwright'
      const s3 = await startS3({ dir: path.join(o.storageDir, 's3'), port: o.s3Port, bucket })
      stops.push(s3.stop)
      Object.assign(env, {
        NUXT_S3_ENDPOINT: s3.endpoint, NUXT_S3_BUCKET: bucket,
        NUXT_S3_ACCESS_KEY_ID: s3.accessKeyId, NUXT_S3_SECRET_ACCESS_KEY: s3.secretAccessKey,
      })
      summary.push(`Object storage  ${s3.endpoint} (s3rver), bucket ${bucket}, data in ${path.join(o.storageDir, 's3')}`)
    }
    if (o.env.NUXT_SMTP_URL) {
      summary.push('Mail            configured: NUXT_SMTP_URL')
    } else {
      const smtp = await startSmtpFake({ dir: path.join(o.storageDir, 'mail'), port: o.smtpPort })
      stops.push(smtp.stop)
      env.NUXT_SMTP_URL = smtp.url
      env.NUXT_MAIL_OUTBOX_DIR = smtp.outboxDir
      summary.push(`Mail fake       ${smtp.url}, messages kept in ${smtp.outboxDir}`)
    }
    if (!o.env.NUXT_SESSION_PASSWORD) env.NUXT_SESSION_PASSWORD = sessionSecret(path.join(o.storageDir, 'session-secret'))
  } catch (err) {
    await stop()
    throw err
  }
  return { env, summary, stop }
}
