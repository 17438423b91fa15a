import { configurePlatform } from '../platform/config'
import { dbReady } from '../platform/db'

// At boot: tell the platform modules where the outside services are (NUXT_* variables through
// the runtime config), then start the migrations so the first request does not pay for them.
export default defineNitroPlugin(() => {
  const c = useRuntimeConfig()
  configurePlatform({
    databaseUrl: c.databaseUrl,
    s3: { endpoint: c.s3Endpoint, region: c.s3Region, bucket: c.s3Bucket, accessKeyId: c.s3AccessKeyId, secretAccessKey: c.s3SecretAccessKey, forcePathStyle: !!c.s3ForcePathStyle },
    smtpUrl: c.smtpUrl,
    mailFrom: c.mailFrom,
    mailOutboxDir: c.mailOutboxDir,
    baseUrl: c.public.baseUrl,
  })
  dbReady().catch((err) => console.error('[decalwright] migrations failed:', err))
})
