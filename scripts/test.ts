// `npm test`: make sure the system packages the tests drive are here (installing them when
// root), then run every test project once: unit tests, and API and browser tests against one
// build of the app with real PostgreSQL, object storage and mail fake.
import { spawnSync } from 'node:child_process'
import { existsSync, readFileSync, rmSync } from 'node:fs'
import { ensureDebianPackages, findPostgresBin, ServiceError } from './lib/services'

try {
  ensureDebianPackages([
    { pkg: 'postgresql', present: () => !!findPostgresBin(), why: 'the database server the tests start' },
    { pkg: 'chromium', present: () => existsSync('/usr/bin/chromium'), why: 'the browser the browser tests drive' },
    { pkg: 'potrace', present: () => existsSync('/usr/bin/potrace'), why: 'the reference tracer the outline is checked against' },
    { pkg: 'python3-shapely', present: () => existsSync('/usr/lib/python3/dist-packages/shapely'), why: 'the independent geometry library the cut sheets are measured with' },
    { pkg: 'python3-ezdxf', present: () => existsSync('/usr/lib/python3/dist-packages/ezdxf'), why: 'the independent DXF reader and auditor the cut sheets are checked with' },
    { pkg: 'python3-fonttools', present: () => existsSync('/usr/lib/python3/dist-packages/fontTools'), why: 'the second font library the plate font is checked against' },
    { pkg: 'poppler-utils', present: () => existsSync('/usr/bin/pdfinfo') && existsSync('/usr/bin/pdftotext'), why: 'the PDF reader the printed job sheet is checked with' },
    { pkg: 'python3-skimage', present: () => existsSync('/usr/lib/python3/dist-packages/skimage'), why: 'the image library the narrowest stroke (skeleton, distance transform), colour conversion, adaptive threshold and straightening are checked against' },
  ])
} catch (err) {
  console.error(err instanceof ServiceError ? `\n${err.message}\n` : err)
  process.exit(1)
}

const summaryFile = 'test-results/vitest.json'
rmSync(summaryFile, { force: true })
const r = spawnSync(process.execPath, [
  'node_modules/vitest/vitest.mjs', 'run', '--reporter=default', '--reporter=json', `--outputFile.json=${summaryFile}`, ...process.argv.slice(2),
], { stdio: 'inherit' })
// One plain closing line, the same for every runner that reads it.
if (existsSync(summaryFile)) {
  const s = JSON.parse(readFileSync(summaryFile, 'utf8')) as { numPassedTests: number; numFailedTests: number; numPendingTests: number; numTodoTests: number }
  console.log(`\nSummary: ${s.numPassedTests} passed, ${s.numFailedTests} failed, ${s.numPendingTests + s.numTodoTests} skipped`)
}
process.exit(r.status ?? 1)
