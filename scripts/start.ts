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
import { loadDemoSeason } from './lib/demo-season'

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
  for (const signal of ['SIGINT', 'SIGTERM', 'SIGHUP'] as const) process.on(signal, () => void shutdown())

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
      await superviseApp({ port, host, env, isStopping: () => stopping, onStop: (stop) => stops.push(stop) })
      url = `http://localhost:${port}`
    }
    // A newly loaded demo program gets a season in progress, made through the app itself.
    if (demo && !dev && process.env.DECALWRIGHT_DEMO_SEASON !== '0') {
      try {
        await loadDemoSeason(`http://${host}:${port}`, (what, done, total) => {
          console.log(done < total ? `Demo season     ${done + 1}/${total} ${what} …` : 'Demo season     loaded')
        })
      } catch (err) {
        // The app is up and the program is usable; say what went wrong instead of stopping.
        console.error(`The demo season stopped part way: ${err instanceof Error ? err.message : err}`)
      }
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

/**
 * Runs the app and starts it again when it dies (a crash, the kernel's out-of-memory killer),
 * waiting longer after each quick failure; the database, object store and mail fake stay up.
 */
async function superviseApp(o: { port: number; host: string; env: Record<string, string>; isStopping: () => boolean; onStop: (stop: () => Promise<void>) => void }) {
  let current = await startApp({ port: o.port, host: o.host, env: o.env })
  let delayMs = 1000
  o.onStop(() => current.stop())
  const watch = (app: typeof current, startedAt: number) => {
    app.child.once('exit', (code, signal) => {
      if (o.isStopping()) return
      // A run that lasted a while was healthy: start again quickly.
      if (Date.now() - startedAt > 60_000) delayMs = 1000
      console.error(`The app stopped unexpectedly (${signal ?? `exit code ${code}`}); starting it again in ${delayMs / 1000} s. The database and files are untouched.`)
      setTimeout(async function again() {
        if (o.isStopping()) return
        try {
          current = await startApp({ port: o.port, host: o.host, env: o.env })
          console.log('The app is running again.')
          watch(current, Date.now())
        } catch (err) {
          console.error(`The app did not start: ${err instanceof Error ? err.message : err}`)
          setTimeout(again, delayMs)
        }
        delayMs = Math.min(delayMs * 2, 30_000)
      }, delayMs)
    })
  }
  watch(current, Date.now())
}

main().catch((err) => {
  console.error(err instanceof ServiceError ? `\n${err.message}\n` : err)
  process.exit(1)
})
