// `npm run bench`, the work queue: what going through the queue adds to an upload. The same
// upload is made twice in the same run, on a stack of its own (PostgreSQL, object store):
// once as the request did it before (the pipeline through the worker pool directly), once as
// a work item (stored, queued, taken by a runner in this process, waited for by polling), and
// the medians are printed with their ratio.
import { mkdtempSync, rmSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { performance } from 'node:perf_hooks'
import { startStack } from './stack'
import { buildPipelineWorker, PIPELINE_WORKER_FILE } from './pipeline-worker-build'
import { createDb, migrateToLatest } from '../../server/db/connect'
import { DEMO_ACCOUNTS, loadDemo } from '../../server/db/demo'
import { configurePlatform } from '../../server/platform/config'
import { platformConfigFromEnv } from '../../server/platform/env-config'
import { useDb } from '../../server/platform/db'
import { installWorkQueue, startWorkRunner } from '../../server/platform/work-queue'
import { runInPool } from '../../server/platform/pipeline-pool'
import { loadActor } from '../../server/auth/service'
import { requestArtwork } from '../../server/artworks/service'
import { parseSettings } from '../../shared/utils/settings'
import { waitForWork } from '../../server/work/items'
import { workTasks } from '../../server/work/tasks'

const median = (xs: number[]) => { const s = [...xs].sort((a, b) => a - b); return s.length % 2 ? s[(s.length - 1) / 2]! : (s[s.length / 2 - 1]! + s[s.length / 2]!) / 2 }

/** A drawing made here: a ring and a bar, each run a little different so nothing is cached. */
async function picture(i: number): Promise<Buffer> {
  const sharp = (await import('sharp')).default
  const svg = `<svg xmlns="http://www.w3.org/2000/svg" width="2000" height="1400"><rect width="100%" height="100%" fill="#f4f1ea"/>
    <circle cx="${700 + i}" cy="700" r="420" fill="none" stroke="#1b1b1b" stroke-width="90"/><rect x="1250" y="300" width="260" height="${800 + i}" fill="#1b1b1b"/></svg>`
  return sharp(Buffer.from(svg)).png().toBuffer()
}

export async function benchQueue(runs: number): Promise<void> {
  const offset = 160
  const storageDir = mkdtempSync(path.join(os.tmpdir(), 'decalwright-bench-queue-'))
  const env = Object.fromEntries(Object.entries(process.env).filter(([k]) => !k.startsWith('NUXT_')))
  const stack = await startStack({ storageDir, pgPort: 54339 + offset, s3Port: 4579 + offset, smtpPort: 2535 + offset, env })
  // Inside the project, so the worker finds sharp, potrace and svgo in node_modules.
  const workerDir = path.resolve('node_modules/.cache/decalwright-bench-queue')
  await buildPipelineWorker(workerDir)
  process.env.DECALWRIGHT_PIPELINE_WORKER = path.join(workerDir, PIPELINE_WORKER_FILE)
  configurePlatform(platformConfigFromEnv(stack.env))
  const setup = createDb(stack.env.NUXT_DATABASE_URL!, 2)
  await migrateToLatest(setup)
  await loadDemo(setup)
  await setup.destroy()
  await installWorkQueue(stack.env.NUXT_DATABASE_URL!)
  const db = useDb()
  const runner = await startWorkRunner(db, { connectionString: stack.env.NUXT_DATABASE_URL!, tasks: workTasks(useDb), concurrency: 1 })
  try {
    const student = await db.selectFrom('users').select('id').where('email', '=', DEMO_ACCOUNTS.student.email).executeTakeFirstOrThrow()
    const actor = (await loadActor(db, student.id, null))!
    const teamId = [...actor.memberships.keys()][0]!
    const direct: number[] = [], queued: number[] = []
    for (let i = 0; i < runs + 1; i++) {
      const bytes = await picture(i)
      let t = performance.now()
      await runInPool({ source: bytes, settings: parseSettings({}), widthMm: 120, purpose: 'revision' })
      const d = performance.now() - t
      t = performance.now()
      const id = await requestArtwork(db, actor, { teamId, programId: actor.programId }, { title: `Bench ${i}`, widthMm: 120, fileName: 'bench.png', bytes: await picture(i + 1000) })
      const item = await waitForWork(db, actor, id, { timeoutMs: 60_000 })
      if (item.state !== 'done') throw new Error(`the queued upload ended ${item.state}: ${item.error?.message}`)
      const q = performance.now() - t
      if (i > 0) { direct.push(d); queued.push(q) } // the first of each warms up
    }
    const [d, q] = [median(direct), median(queued)]
    console.log(`work queue: upload through the queue ${q.toFixed(0)} ms median, the pipeline alone ${d.toFixed(0)} ms: ${(q / d).toFixed(2)}× (${runs} runs; the queue adds storing, two transactions and the wait)`)
  } finally {
    await runner.stop()
    await db.destroy()
    await stack.stop()
    rmSync(storageDir, { recursive: true, force: true })
  }
}
