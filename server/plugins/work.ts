import os from 'node:os'
import { dbReady, useDb } from '../platform/db'
import { startWorkRunner, type WorkRunner } from '../platform/work-queue'
import { workTasks } from '../work/tasks'
import { giveUpStrandedWork } from '../work/items'

// The app runs the work queue's jobs itself unless NUXT_WORK_IN_APP=0 (then `npm run worker`
// processes do), so one `npm start` needs nothing else. Started once the database is ready;
// on close, running jobs finish first.
export default defineNitroPlugin((nitro) => {
  const c = useRuntimeConfig()
  if (!c.workInApp || String(c.workInApp) === '0' || String(c.workInApp) === 'false') return
  let runner: WorkRunner | undefined
  let closed = false
  const start = () => void dbReady()
    .then(() => closed ? undefined : startWorkRunner(useDb(), {
      connectionString: c.databaseUrl,
      tasks: workTasks(useDb),
      concurrency: Number(c.workConcurrency) || os.availableParallelism(),
      afterRelease: () => giveUpStrandedWork(useDb()),
    }))
    .then((r) => { runner = r }, (err) => {
      console.error('[decalwright] the work queue runner could not start:', err instanceof Error ? err.message : err)
      setTimeout(start, 5000).unref()
    })
  start()
  nitro.hooks.hook('close', async () => {
    closed = true
    await runner?.stop()
  })
})
