// Once per test run: real services on their own ports under storage/test (started afresh),
// migrations, the demo program, one build of the app and one server for every e2e file.
import { rmSync } from 'node:fs'
import path from 'node:path'
import type { TestProject } from 'vitest/node'
import { startStack } from '../../scripts/lib/stack'
import { buildApp } from '../../scripts/lib/build'
import { startApp } from '../../scripts/lib/app-process'
import { createDb, migrateToLatest } from '../../server/db/connect'
import { loadDemo } from '../../server/db/demo'

// DECALWRIGHT_TEST_PORT_OFFSET and DECALWRIGHT_TEST_STORAGE let two test runs share a machine.
const offset = Number(process.env.DECALWRIGHT_TEST_PORT_OFFSET ?? 0)
export const TEST_PORTS = { app: 3917 + offset, pg: 54339 + offset, s3: 4579 + offset, smtp: 2535 + offset, spare: 3940 + offset }

declare module 'vitest' {
  export interface ProvidedContext {
    baseUrl: string
    databaseUrl: string
    mailDir: string
    s3: { endpoint: string; bucket: string; accessKeyId: string; secretAccessKey: string }
    /** The environment the app was started with, for tests that start another app beside it. */
    appEnv: Record<string, string>
    /** The first port a test may use for an app or a service of its own. */
    spareTestPort: number
  }
}

export default async function setup(project: TestProject) {
  const storageDir = path.resolve(process.env.DECALWRIGHT_TEST_STORAGE ?? 'storage/test')
  rmSync(storageDir, { recursive: true, force: true })
  // Local services only: a developer's own NUXT_* settings must not point tests at real ones.
  const cleanEnv = Object.fromEntries(Object.entries(process.env).filter(([k]) => !k.startsWith('NUXT_')))
  const stack = await startStack({ storageDir, pgPort: TEST_PORTS.pg, s3Port: TEST_PORTS.s3, smtpPort: TEST_PORTS.smtp, env: cleanEnv })
  let app: Awaited<ReturnType<typeof startApp>> | undefined
  try {
    const db = createDb(stack.env.NUXT_DATABASE_URL!, 2)
    await migrateToLatest(db)
    await loadDemo(db)
    await db.destroy()
    buildApp()
    const baseUrl = `http://127.0.0.1:${TEST_PORTS.app}`
    const appEnv = { ...stack.env, NUXT_PUBLIC_BASE_URL: baseUrl }
    app = await startApp({ port: TEST_PORTS.app, host: '127.0.0.1', env: appEnv, quiet: !process.env.DECALWRIGHT_TEST_LOGS })
    project.provide('appEnv', appEnv)
    project.provide('spareTestPort', TEST_PORTS.spare)
    project.provide('baseUrl', baseUrl)
    project.provide('databaseUrl', stack.env.NUXT_DATABASE_URL!)
    project.provide('mailDir', stack.env.NUXT_MAIL_OUTBOX_DIR!)
    project.provide('s3', {
      endpoint: stack.env.NUXT_S3_ENDPOINT!, bucket: stack.env.NUXT_S3_BUCKET!,
      accessKeyId: stack.env.NUXT_S3_ACCESS_KEY_ID!, secretAccessKey: stack.env.NUXT_S3_SECRET_ACCESS_KEY!,
    })
  } catch (err) {
    await app?.stop()
    await stack.stop()
    throw err
  }
  return async () => {
    await app?.stop()
    await stack.stop()
  }
}
