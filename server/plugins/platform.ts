import { configurePlatform } from '../platform/config'
import { dbReady, useDb } from '../platform/db'
import { startMailSender } from '../platform/mail'

// At boot: tell the platform modules where the outside services are (NUXT_* variables through
// the runtime config), start the migrations so the first request does not pay for them, then
// the outbox's sender.
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
  })
  const ready = dbReady()
  ready.catch((err) => console.error('[decalwright] migrations failed:', err))
  let stopSender: (() => void) | undefined
  void ready.then(() => {
    stopSender = startMailSender(useDb(), { intervalMs: 1000, retryBaseMs: Number(c.mailRetryBaseMs) || 5000 })
  }, () => {})
  nitro.hooks.hook('close', () => stopSender?.())
})
