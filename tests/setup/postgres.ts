// Once per run of the service tests: a PostgreSQL cluster of their own (nothing else: no
// object store, no mail, no app build), migrated to the latest schema with the work queue's, and the cut sheets'
// worker thread bundled as the build bundles it (jobs lay their copies out in it). Each test then works
// inside a transaction that is rolled back (tests/support/service.ts).
import { rmSync } from 'node:fs'
import path from 'node:path'
import type { TestProject } from 'vitest/node'
import { buildCutSheetWorker } from '../../scripts/lib/pipeline-worker-build'
import { startPostgres } from '../../scripts/lib/services'
import { createDb, migrateToLatest } from '../../server/db/connect'
import { installWorkQueue } from '../../server/platform/work-queue'

// Beside the e2e project's folder (which that project empties when it starts), ten ports up.
const offset = Number(process.env.DECALWRIGHT_TEST_PORT_OFFSET ?? 0)
export const SERVICE_PG_PORT = 54349 + offset

declare module 'vitest' {
  export interface ProvidedContext {
    serviceDatabaseUrl: string
    cutSheetWorker: string
  }
}

export default async function setup(project: TestProject) {
  const dir = path.resolve(`${process.env.DECALWRIGHT_TEST_STORAGE ?? 'storage/test'}-service`)
  rmSync(dir, { recursive: true, force: true })
  // Handed to this project's test workers only (tests/support/service.ts): the app of the e2e
  // project, started from the same process, must keep the worker bundled beside its own server,
  // which shares the server's copy of piscina.
  const cutSheetWorker = await buildCutSheetWorker(path.resolve('node_modules/.cache/decalwright-service'))
  const pg = await startPostgres({ dir, port: SERVICE_PG_PORT })
  try {
    const db = createDb(pg.url, 1)
    await migrateToLatest(db)
    await db.destroy()
    await installWorkQueue(pg.url)
  } catch (err) {
    await pg.stop()
    throw err
  }
  project.provide('serviceDatabaseUrl', pg.url)
  project.provide('cutSheetWorker', cutSheetWorker)
  return () => pg.stop()
}
