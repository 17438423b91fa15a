// `npm test`: make sure the system packages the tests drive are here (installing them when
// root), then run every test project once: unit tests, and API and browser tests against one
// build of the app with real PostgreSQL, object storage and mail fake.
import { spawnSync } from 'node:child_process'
import { existsSync } from 'node:fs'
import { ensureDebianPackages, findPostgresBin, ServiceError } from './lib/services'

try {
  ensureDebianPackages([
    { pkg: 'postgresql', present: () => !!findPostgresBin(), why: 'the database server the tests start' },
    { pkg: 'chromium', present: () => existsSync('/usr/bin/chromium'), why: 'the browser the browser tests drive' },
    { pkg: 'potrace', present: () => existsSync('/usr/bin/potrace'), why: 'the reference tracer the outline is checked against' },
  ])
} catch (err) {
  console.error(err instanceof ServiceError ? `\n${err.message}\n` : err)
  process.exit(1)
}

const r = spawnSync(process.execPath, ['node_modules/vitest/vitest.mjs', 'run', ...process.argv.slice(2)], { stdio: 'inherit' })
process.exit(r.status ?? 1)
