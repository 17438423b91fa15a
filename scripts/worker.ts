// `npm run worker`: a worker process for the work queue, from the app's build (built first when
// the sources are newer). Set the same NUXT_* variables as for the app, and NUXT_WORK_IN_APP=0
// on the app when its jobs should run only in workers.
import path from 'node:path'
import { pathToFileURL } from 'node:url'
import { buildApp, OUTPUT_DIR } from './lib/build'
import { CUTSHEET_WORKER_FILE, PIPELINE_WORKER_FILE, WORK_RUNNER_FILE } from './lib/pipeline-worker-build'

buildApp()
const serverDir = path.join(OUTPUT_DIR, 'server')
// The pipeline's and the cut sheets' worker threads are found beside the runner, which is not this script.
process.env.DECALWRIGHT_PIPELINE_WORKER ??= path.join(serverDir, PIPELINE_WORKER_FILE)
process.env.DECALWRIGHT_CUTSHEET_WORKER ??= path.join(serverDir, CUTSHEET_WORKER_FILE)
await import(pathToFileURL(path.join(serverDir, WORK_RUNNER_FILE)).href)
