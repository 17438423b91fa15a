// `npm start`: PostgreSQL, object storage and the mail fake on loopback (each unless
// configured), migrations, the demo program, a build when sources changed, then the app.
import { spawn } from 'node:child_process'
import path from 'node:path'
import { startStack } from './lib/stack'
import { assertPortFree, ServiceError } from './lib/services'
import { buildApp } from './lib/build'
import { startApp } from './lib/app-process'
import { createDb, migrateToLatest } from '../server/db/connect'
import { DEMO_ACCOUNTS, DEMO_PASSWORD, loadDemo } from '../server/db/demo'

const dev = process.argv.includes('--dev')
const port = Number(process.env.PORT ?? 3000)
const host = process.env.HOST ?? '127.0.0.1'

async function main() {
  await assertPortFree(port, 'the app', 'PORT')
  console.log('Starting Decalwright …')
  const stack = await startStack({
    storageDir: path.resolve(process.env.DECALWRIGHT_STORAGE ?? 'storage'),
    pgPort: Number(process.env.DECALWRIGHT_PG_PORT ?? 54329),
    s3Port: Number(process.env.DECALWRIGHT_S3_PORT ?? 4569),
    smtpPort: Number(process.env.DECALWRIGHT_SMTP_PORT ?? 2525),
    env: process.env,
  })
  let stopping = false
  const stops: (() => Promise<void>)[] = [stack.stop]
  const shutdown = async (code = 0) => {
    if (stopping) return
    stopping = true
    console.log('\nStopping Decalwright …')
    for (const s of stops.reverse()) await s().catch((e) => console.error(e))
    console.log('Stopped. Your data is kept in storage/.')
    process.exit(code)
  }
  process.on('SIGINT', () => void shutdown())
  process.on('SIGTERM', () => void shutdown())

  try {
    const env = { ...stack.env, NUXT_PUBLIC_BASE_URL: process.env.NUXT_PUBLIC_BASE_URL ?? `http://localhost:${port}` }
    const databaseUrl = process.env.NUXT_DATABASE_URL ?? env.NUXT_DATABASE_URL!
    const db = createDb(databaseUrl, 2)
    const applied = await migrateToLatest(db)
    if (applied.length) console.log(`Migrations applied: ${applied.join(', ')}`)
    const demo = process.env.DECALWRIGHT_DEMO !== '0' && (await loadDemo(db))
    await db.destroy()

    let url: string
    if (dev) {
      const child = spawn(process.execPath, [path.resolve('node_modules/nuxt/bin/nuxt.mjs'), 'dev', '--port', String(port), '--host', host],
        { stdio: 'inherit', env: { ...process.env, ...env } })
      stops.push(() => new Promise((r) => { child.once('exit', () => r()); child.kill('SIGTERM') }))
      child.once('exit', (code) => void shutdown(code ?? 0))
      url = `http://localhost:${port}`
    } else {
      buildApp()
      const app = await startApp({ port, host, env })
      stops.push(app.stop)
      app.child.once('exit', (code) => { if (!stopping) { console.error('The app stopped unexpectedly.'); void shutdown(code ?? 1) } })
      url = `http://localhost:${port}`
    }
    console.log('')
    console.log(`Decalwright     ${url}${dev ? ' (development mode)' : ''}`)
    for (const line of stack.summary) console.log(line)
    if (demo) console.log('Demo program    loaded (Harbourline Robotics, fictional)')
    console.log(`Demo accounts   password "${DEMO_PASSWORD}" for each:`)
    for (const [role, a] of Object.entries(DEMO_ACCOUNTS)) console.log(`                ${role.padEnd(9)} ${a.email}`)
    console.log('Press Ctrl-C to stop everything.')
  } catch (err) {
    console.error(err instanceof Error ? err.message : err)
    await shutdown(1)
  }
}

main().catch((err) => {
  console.error(err instanceof ServiceError ? `\n${err.message}\n` : err)
  process.exit(1)
})
