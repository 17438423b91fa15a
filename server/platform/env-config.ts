// The platform's settings read straight from NUXT_* variables, for processes that run without
// Nitro (the queue's worker). The names and defaults are those of runtimeConfig in
// nuxt.config.ts, which the app reads the same variables through.
import type { PlatformConfig } from './config'

type Env = Record<string, string | undefined>

const text = (env: Env, name: string, fallback: string) => env[name] ?? fallback
const num = (env: Env, name: string, fallback: number) => {
  const v = Number(env[name])
  return env[name] !== undefined && env[name] !== '' && Number.isFinite(v) ? v : fallback
}

export function platformConfigFromEnv(env: Env = process.env): PlatformConfig {
  return {
    databaseUrl: text(env, 'NUXT_DATABASE_URL', ''),
    s3: {
      endpoint: text(env, 'NUXT_S3_ENDPOINT', ''),
      region: text(env, 'NUXT_S3_REGION', 'us-east-1'),
      bucket: text(env, 'NUXT_S3_BUCKET', 'decalwright'),
      accessKeyId: text(env, 'NUXT_S3_ACCESS_KEY_ID', ''),
      secretAccessKey: text(env, 'NUXT_S3_SECRET_ACCESS_KEY', ''),
      forcePathStyle: !['false', '0'].includes(text(env, 'NUXT_S3_FORCE_PATH_STYLE', 'true')),
    },
    smtpUrl: text(env, 'NUXT_SMTP_URL', ''),
    mailFrom: text(env, 'NUXT_MAIL_FROM', 'Decalwright <decalwright@localhost>'),
    mailOutboxDir: text(env, 'NUXT_MAIL_OUTBOX_DIR', ''),
    baseUrl: text(env, 'NUXT_PUBLIC_BASE_URL', 'http://localhost:3000'),
    mailRetryBaseMs: num(env, 'NUXT_MAIL_RETRY_BASE_MS', 5000),
    dbQueryTimeoutMs: num(env, 'NUXT_DB_QUERY_TIMEOUT_MS', 15000),
    s3TimeoutMs: num(env, 'NUXT_S3_TIMEOUT_MS', 10000),
  }
}

/** How many jobs one runner works on at once (NUXT_WORK_CONCURRENCY; default: one per core). */
export function workConcurrency(env: Env, cores: number): number {
  return Math.max(1, Math.floor(num(env, 'NUXT_WORK_CONCURRENCY', cores)))
}
