import { configurePlatform } from '../platform/config'
import { dbReady, useDb } from '../platform/db'
import { everyInterval } from '../platform/housekeeping'
import { forgetOldRequests } from '../platform/idempotency'
import { startMailSender } from '../platform/mail'
import { sweepOrphans } from '../artworks/objects'
import { sweepKeptSheets } from '../jobs/sheets'

// At boot: tell the platform modules where the outside services are (NUXT_* variables through
// the runtime config), start the migrations so the first request does not pay for them, then
// the outbox's sender and the housekeeping (stored files nothing points at, old answers kept for
// repeated requests). A database that is down at boot delays them; it does not stop them.
export default defineNitroPlugin((nitro) => {
  const c = useRuntimeConfig()
  configurePlatform({
    databaseUrl: c.databaseUrl,
    s3: { endpoint: c.s3Endpoint, region: c.s3Region, bucket: c.s3Bucket, accessKeyId: c.s3AccessKeyId, secretAccessKey: c.s3SecretAccessKey, forcePathStyle: !!c.s3ForcePathStyle },
    smtpUrl: c.smtpUrl,
    mailFrom: c.mailFrom,
    mailOutboxDir: c.mailOutboxDir,
    baseUrl: c.public.baseUrl,
    mailRetryBaseMs: Number(c.mailRetryBaseMs),
    trustedProxies: String(c.trustedProxies ?? '').split(',').map((x) => x.trim()).filter(Boolean),
    dbQueryTimeoutMs: Number(c.dbQueryTimeoutMs),
    s3TimeoutMs: Number(c.s3TimeoutMs),
  })
  const ready = dbReady()
  ready.catch((err) => console.error('[decalwright] migrations failed:', err))
  let stopSender: (() => void) | undefined
  const startSender = () => void dbReady().then(() => {
    stopSender = startMailSender(useDb(), { intervalMs: 1000, retryBaseMs: Number(c.mailRetryBaseMs) || 5000 })
  }, () => { setTimeout(startSender, 5000).unref() })
  startSender()
  const minAgeS = Number(c.orphanMinAgeS) || 3600
  const stopSweeper = everyInterval(useDb(), {
    task: 'sweep-stored-files',
    intervalS: Number(c.orphanSweepIntervalS) || 600,
    ready: dbReady,
    work: async () => {
      const removed = await sweepOrphans(useDb(), { minAgeS })
      const forgotten = await forgetOldRequests(useDb())
      const sheets = await sweepKeptSheets(useDb())
      if (removed || forgotten || sheets) console.log(`[decalwright] housekeeping: ${removed} stored files nothing used, ${forgotten} old request answers, ${sheets} kept cut sheets no one can ask for removed`)
    },
  })
  nitro.hooks.hook('close', () => {
    stopSender?.()
    stopSweeper()
  })
})
