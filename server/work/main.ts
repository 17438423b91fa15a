// The work queue's worker process (`npm run worker`, bundled next to the server as
// work-runner.mjs): takes jobs from the queue in PostgreSQL until SIGTERM or SIGINT, then lets
// the running ones finish and stops. Reads the same NUXT_* settings as the app.
import os from 'node:os'
import { configurePlatform } from '../platform/config'
import { dbReady, useDb } from '../platform/db'
import { platformConfigFromEnv, workConcurrency } from '../platform/env-config'
import { startWorkRunner } from '../platform/work-queue'
import { workTasks } from './tasks'
import { giveUpStrandedWork } from './items'

async function main(): Promise<void> {
  const config = platformConfigFromEnv(process.env)
  if (!config.databaseUrl) throw new Error('NUXT_DATABASE_URL is not set: the worker needs the app\'s PostgreSQL.')
  configurePlatform(config)
  await dbReady()
  const runner = await startWorkRunner(useDb(), {
    connectionString: config.databaseUrl,
    tasks: workTasks(useDb),
    concurrency: workConcurrency(process.env, os.availableParallelism()),
    afterRelease: () => giveUpStrandedWork(useDb()),
  })
  console.log(`[decalwright] worker ${process.pid} is taking work from the queue`)
  let stopping = false
  const stop = async (signal: string) => {
    if (stopping) return
    stopping = true
    console.log(`[decalwright] worker ${process.pid}: ${signal}, finishing the work in hand`)
    try {
      await runner.stop()
      await useDb().destroy()
    } finally {
      process.exit(0)
    }
  }
  process.once('SIGTERM', () => void stop('SIGTERM'))
  process.once('SIGINT', () => void stop('SIGINT'))
}

main().catch((err) => {
  console.error('[decalwright] the worker could not start:', err instanceof Error ? err.stack ?? err.message : err)
  process.exit(1)
})
