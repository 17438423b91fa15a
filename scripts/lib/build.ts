// One production build of the app, redone only when a source file is newer than it.
import { spawnSync } from 'node:child_process'
import { existsSync, readdirSync, statSync } from 'node:fs'
import path from 'node:path'

const SOURCES = ['app', 'server', 'shared', 'public', 'nuxt.config.ts', 'tailwind.config.ts', 'package-lock.json', 'scripts/lib/pipeline-worker-build.ts']

function newestMtime(p: string): number {
  if (!existsSync(p)) return 0
  const st = statSync(p)
  if (!st.isDirectory()) return st.mtimeMs
  let newest = st.mtimeMs
  for (const entry of readdirSync(p)) newest = Math.max(newest, newestMtime(path.join(p, entry)))
  return newest
}

/** Where the build goes: `.output`, or DECALWRIGHT_OUTPUT_DIR (see nuxt.config.ts). */
export const OUTPUT_DIR = path.resolve(process.env.DECALWRIGHT_OUTPUT_DIR ?? '.output')
export const SERVER_ENTRY = path.join(OUTPUT_DIR, 'server/index.mjs')

export function buildIsCurrent(root = process.cwd()): boolean {
  const stamp = path.join(OUTPUT_DIR, 'nitro.json')
  if (!existsSync(stamp)) return false
  const built = statSync(stamp).mtimeMs
  return SOURCES.every((s) => newestMtime(path.join(root, s)) <= built)
}

export function buildApp(force = false): void {
  if (!force && buildIsCurrent()) {
    console.log('The app build is up to date.')
    return
  }
  console.log('Building the app (about a minute on two cores) …')
  const r = spawnSync(process.execPath, [path.resolve('node_modules/nuxt/bin/nuxt.mjs'), 'build'], { stdio: 'inherit', env: { ...process.env, NODE_ENV: 'production' } })
  if (r.status !== 0) throw new Error('The app did not build; see the output above.')
}
