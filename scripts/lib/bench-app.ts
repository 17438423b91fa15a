// The built app on services of its own for a benchmark: a fresh PostgreSQL, S3 fake and mail
// fake under storage/<name>, the migrations and the demo program, and a way to start the app.
import { rmSync } from 'node:fs'
import path from 'node:path'
import { startStack, type Stack } from './stack'
import { buildApp } from './build'
import { startApp, type AppProcess } from './app-process'
import { createDb, migrateToLatest } from '../../server/db/connect'
import { loadDemo } from '../../server/db/demo'

export interface BenchApp {
  stack: Stack
  base: string
  /** The demo team the benchmarks upload for. */
  wrensId: number
  start: () => Promise<AppProcess>
}

export async function benchApp(name: string, ports: { app: number; pg: number; s3: number; smtp: number }): Promise<BenchApp> {
  const storageDir = path.resolve('storage', name)
  rmSync(storageDir, { recursive: true, force: true })
  const clean = Object.fromEntries(Object.entries(process.env).filter(([k]) => !k.startsWith('NUXT_')))
  const stack = await startStack({ storageDir, pgPort: ports.pg, s3Port: ports.s3, smtpPort: ports.smtp, env: clean })
  try {
    const db = createDb(stack.env.NUXT_DATABASE_URL!, 1)
    await migrateToLatest(db)
    await loadDemo(db)
    const team = await db.selectFrom('team').select('id').where('name', '=', 'Copper Wrens').executeTakeFirstOrThrow()
    await db.destroy()
    buildApp()
    const base = `http://127.0.0.1:${ports.app}`
    const start = () => startApp({ port: ports.app, host: '127.0.0.1', env: { ...stack.env, NUXT_PUBLIC_BASE_URL: base }, quiet: true })
    return { stack, base, wrensId: team.id, start }
  } catch (err) {
    await stack.stop()
    throw err
  }
}
