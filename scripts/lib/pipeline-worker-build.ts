// Bundles server/pipeline/worker.ts into one file that piscina loads in each worker thread,
// and server/work/main.ts into the work queue's worker process (`npm run worker`), both next
// to the server. Native and CommonJS-heavy packages stay external and resolve from the
// server's node_modules, where Nitro has traced them.
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { build } from 'esbuild'

export const PIPELINE_WORKER_FILE = 'pipeline-worker.mjs'

export const WORK_RUNNER_FILE = 'work-runner.mjs'

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..')

export async function buildPipelineWorker(outDir: string): Promise<void> {
  await build({
    entryPoints: [path.join(root, 'server/pipeline/worker.ts')],
    outfile: path.join(outDir, PIPELINE_WORKER_FILE),
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    external: ['sharp', 'potrace', 'svgo'],
    logLevel: 'warning',
  })
}

export async function buildWorkRunner(outDir: string): Promise<void> {
  await build({
    entryPoints: [path.join(root, 'server/work/main.ts')],
    outfile: path.join(outDir, WORK_RUNNER_FILE),
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    alias: { '#shared': path.join(root, 'shared'), '#server': path.join(root, 'server') },
    external: ['sharp', 'potrace', 'svgo', 'pg', 'graphile-worker', 'nodemailer', 'piscina', '@aws-sdk/*'],
    // Bundled CommonJS code may call require() and read __dirname; give it both.
    banner: {
      js: [
        "import { createRequire as __dwRequire } from 'node:module';",
        "import { fileURLToPath as __dwPath } from 'node:url';",
        "import { dirname as __dwDirname } from 'node:path';",
        'const require = __dwRequire(import.meta.url);',
        'const __filename = __dwPath(import.meta.url);',
        'const __dirname = __dwDirname(__filename);',
      ].join(' '),
    },
    logLevel: 'warning',
  })
}
