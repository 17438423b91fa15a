// Where the outside services are. Set once at start-up from Nuxt's runtime config
// (server/plugins/platform.ts), or by a test; read by the other platform modules, so they
// work the same inside the Nitro server and in plain Node.
import type { Transporter } from 'nodemailer'

export interface PlatformConfig {
  databaseUrl: string
  s3: { endpoint: string; region: string; bucket: string; accessKeyId: string; secretAccessKey: string; forcePathStyle: boolean }
  smtpUrl: string
  mailFrom: string
  /** Set only while the local SMTP fake is in use: its outbox folder. */
  mailOutboxDir: string
  /** The address people use, for links in e-mail. */
  baseUrl: string
  /** The first wait before a failed delivery is tried again, ms. */
  mailRetryBaseMs?: number
  /** Proxies whose forwarded headers are believed: addresses or CIDR ranges. */
  trustedProxies?: string[]
  /** How long one database query may take, ms. */
  dbQueryTimeoutMs?: number
  /** How long the object store may stay silent before a request to it gives up, ms. */
  s3TimeoutMs?: number
  /** A ready transport instead of smtpUrl (tests keep messages in memory with it). */
  mailTransport?: Transporter
}

let current: PlatformConfig | undefined

export function configurePlatform(config: PlatformConfig): void {
  current = config
}

export function platformConfig(): PlatformConfig {
  if (!current) throw new Error('The platform is not configured: call configurePlatform() at start-up.')
  return current
}
