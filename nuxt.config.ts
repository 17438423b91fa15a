import { fileURLToPath } from 'node:url'
import { buildWorkers } from './scripts/lib/pipeline-worker-build'

// Nuxt configuration. Every endpoint comes from NUXT_* variables at run time
// (runtimeConfig), so one build serves development, tests and production.
export default defineNuxtConfig({
  compatibilityDate: '2026-06-01',
  // Separate build folders let two checkouts' builds (or two developers' test runs) coexist.
  ...(process.env.DECALWRIGHT_BUILD_DIR ? { buildDir: process.env.DECALWRIGHT_BUILD_DIR } : {}),
  devtools: { enabled: false },
  telemetry: false,
  modules: ['@nuxtjs/tailwindcss', '@pinia/nuxt', 'nuxt-auth-utils', 'nuxt-security', '@nuxt/eslint'],
  // Page headers: a content security policy with a nonce per response (no page may be framed,
  // nothing loads from elsewhere), nosniff and a referrer policy. The module's in-memory rate
  // limiter, size limiter, CORS and XSS filters are off: limits live in PostgreSQL so they
  // hold across app processes, bodies are limited while they are read (server/platform/body.ts),
  // and cross-site writes are refused by server/middleware/02.request-guard.ts.
  security: {
    nonce: true,
    headers: {
      contentSecurityPolicy: {
        'default-src': ["'self'"],
        'script-src': ["'self'", "'nonce-{{nonce}}'", "'strict-dynamic'"],
        'style-src': ["'self'", "'unsafe-inline'"],
        'img-src': ["'self'", 'data:', 'blob:'],
        'font-src': ["'self'"],
        'connect-src': ["'self'"],
        'object-src': ["'none'"],
        'base-uri': ["'none'"],
        'form-action': ["'self'"],
        'frame-ancestors': ["'none'"],
        'upgrade-insecure-requests': false,
      },
      crossOriginEmbedderPolicy: false,
      referrerPolicy: 'same-origin',
      xContentTypeOptions: 'nosniff',
      xFrameOptions: 'DENY',
      // Only meaningful over HTTPS; set at the TLS-terminating proxy in production.
      strictTransportSecurity: false,
    },
    rateLimiter: false,
    requestSizeLimiter: false,
    xssValidator: false,
    corsHandler: false,
    allowedMethodsRestricter: false,
    removeLoggers: false,
  },
  css: ['~/assets/css/main.css'],
  // Our stylesheet carries the @tailwind directives; without this the module adds a second copy.
  tailwindcss: { cssPath: '~/assets/css/main.css' },
  app: {
    head: {
      title: 'Decalwright',
      htmlAttrs: { lang: 'en' },
      meta: [
        { name: 'viewport', content: 'width=device-width, initial-scale=1' },
        { name: 'description', content: 'From a student drawing to an approved, cut-ready decal on the robot.' },
      ],
      link: [{ rel: 'icon', type: 'image/svg+xml', href: '/favicon.svg' }],
    },
  },
  runtimeConfig: {
    // NUXT_DATABASE_URL
    databaseUrl: '',
    // NUXT_S3_ENDPOINT, NUXT_S3_REGION, NUXT_S3_BUCKET, NUXT_S3_ACCESS_KEY_ID, NUXT_S3_SECRET_ACCESS_KEY
    s3Endpoint: '',
    s3Region: 'us-east-1',
    s3Bucket: 'decalwright',
    s3AccessKeyId: '',
    s3SecretAccessKey: '',
    s3ForcePathStyle: true,
    // NUXT_SMTP_URL, NUXT_MAIL_FROM
    smtpUrl: '',
    mailFrom: 'Decalwright <decalwright@localhost>',
    // NUXT_MAIL_OUTBOX_DIR: set only when the local SMTP fake is in use; enables the mail page.
    mailOutboxDir: '',
    // NUXT_MAIL_RETRY_BASE_MS: the first wait before a failed delivery is tried again (doubling, at most 15 min).
    mailRetryBaseMs: 5000,
    // NUXT_TRUSTED_PROXIES: addresses or CIDR ranges of the proxies in front of the app, comma
    // separated; only their X-Forwarded-For and X-Forwarded-Host are believed. Default: none.
    trustedProxies: '',
    // NUXT_DB_QUERY_TIMEOUT_MS: how long one database query may take before the request is answered 503.
    dbQueryTimeoutMs: 15000,
    // NUXT_S3_TIMEOUT_MS: how long the object store may take to connect, or stay silent mid-answer,
    // before the request is answered 503 (one retry first).
    s3TimeoutMs: 10000,
    // NUXT_ORPHAN_MIN_AGE_S: stored files nothing points at are removed once this old.
    orphanMinAgeS: 3600,
    // NUXT_ORPHAN_SWEEP_INTERVAL_S: how often one of the app processes looks for them.
    orphanSweepIntervalS: 600,
    // NUXT_WORK_IN_APP: the app runs the work queue's jobs itself; 0 leaves them to `npm run worker` processes.
    workInApp: true,
    // NUXT_WORK_CONCURRENCY: jobs one process works on at once (0: one per core).
    workConcurrency: 0,
    // NUXT_WORK_WAIT_MS: how long an upload or revision request waits for its work before answering 202.
    workWaitMs: 60000,
    // NUXT_PUBLIC_BASE_URL: used for links in e-mail.
    public: {
      baseUrl: 'http://localhost:3000',
    },
    // NUXT_SESSION_PASSWORD is read by nuxt-auth-utils.
    session: {
      name: 'decalwright-session',
      maxAge: 60 * 60 * 24 * 14,
      cookie: { sameSite: 'lax' },
    },
  },
  nitro: {
    ...(process.env.DECALWRIGHT_OUTPUT_DIR ? { output: { dir: process.env.DECALWRIGHT_OUTPUT_DIR } } : {}),
    // The server runs on the Node.js we pin (20), not an older one: its syntax (BigInt literals
    // in the exact Otsu, optional chaining) is kept as written instead of lowered to ES2019.
    esbuild: { options: { target: 'node20' } },
    // Native and CommonJS-heavy packages stay in node_modules rather than being bundled;
    // potrace and svgo are used only by the pipeline worker, so they are traced in by hand.
    externals: {
      external: ['sharp', 'pg', 'potrace', 'svgo', 'nodemailer', 'graphile-worker'],
      traceInclude: [
        fileURLToPath(new URL('./node_modules/potrace/lib/index.js', import.meta.url)),
        fileURLToPath(new URL('./node_modules/svgo/lib/svgo-node.js', import.meta.url)),
      ],
    },
    hooks: {
      // The pipeline and the cut sheets run in worker threads, and the work queue's worker
      // process (`npm run worker`) runs from a bundle of its own: all next to the server.
      compiled: (nitro) => buildWorkers(nitro.options.dev ? nitro.options.buildDir : nitro.options.output.serverDir),
    },
  },
  hooks: {
    // Our error handler runs before Nuxt's and Nitro's own: it turns an outside service that did
    // not answer (server/platform/faults.ts) into a 503 with a sentence, which they then render
    // as they render any error (JSON for the API, the error page for a page).
    'nitro:config': (config) => {
      const theirs = [config.errorHandler ?? []].flat()
      config.errorHandler = [fileURLToPath(new URL('./server/error-handler.ts', import.meta.url)), ...theirs]
    },
  },
  typescript: { strict: true },
})
