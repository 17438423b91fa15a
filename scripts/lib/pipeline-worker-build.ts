// Bundles the worker threads' entries into one file each, which piscina loads in each thread:
// server/pipeline/worker.ts (sharp, native, with potrace and svgo, stays external and resolves
// from the server's node_modules) and server/cutsheet/worker.ts (piscina stays external: move()
// marks answers with a symbol private to the copy of piscina that runs the thread; the S3
// client, which stores a kept set's files from the thread, resolves from node_modules); and
// server/work/main.ts into the work queue's worker process (`npm run worker`).
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { build } from 'esbuild'

export const PIPELINE_WORKER_FILE = 'pipeline-worker.mjs'
export const CUTSHEET_WORKER_FILE = 'cutsheet-worker.mjs'

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..')
/** Nuxt's aliases, for server modules that import shared ones. */
const ALIASES = { '#shared': path.join(root, 'shared'), '#server': path.join(root, 'server') }

function bundle(entry: string, outfile: string, external: string[]) {
  return build({ entryPoints: [path.join(root, entry)], outfile, bundle: true, platform: 'node', format: 'esm', target: 'node20', external, alias: ALIASES, logLevel: 'warning' })
}

export const WORK_RUNNER_FILE = 'work-runner.mjs'

export async function buildPipelineWorker(outDir: string): Promise<void> {
  await bundle('server/pipeline/worker.ts', path.join(outDir, PIPELINE_WORKER_FILE), ['sharp', 'potrace', 'svgo'])
}

/** The cut sheets' worker; returns its path. */
export async function buildCutSheetWorker(outDir: string): Promise<string> {
  const file = path.join(outDir, CUTSHEET_WORKER_FILE)
  await bundle('server/cutsheet/worker.ts', file, ['piscina', '@aws-sdk/*'])
  return file
}

/** Every bundle next to the server (the Nitro `compiled` hook). */
export async function buildWorkers(outDir: string): Promise<void> {
  await Promise.all([buildPipelineWorker(outDir), buildCutSheetWorker(outDir), buildWorkRunner(outDir)])
}

export async function buildWorkRunner(outDir: string): Promise<void> {
  await build({
    entryPoints: [path.join(root, 'server/work/main.ts')],
    outfile: path.join(outDir, WORK_RUNNER_FILE),
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    alias: ALIASES,
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
