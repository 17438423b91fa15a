// Bundles server/pipeline/worker.ts into one file that piscina loads in each worker thread.
// sharp (native), potrace and svgo stay external and resolve from the server's node_modules.
import path from 'node:path'
import { fileURLToPath } from 'node:url'
import { build } from 'esbuild'

export const PIPELINE_WORKER_FILE = 'pipeline-worker.mjs'

export async function buildPipelineWorker(outDir: string): Promise<void> {
  const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '../..')
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
