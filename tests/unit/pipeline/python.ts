// Runs a short script in Debian's Python with scikit-image (package python3-skimage), for
// checks against a general image library. Fails with a clear message when it is missing.
import { execFileSync } from 'node:child_process'
import { existsSync } from 'node:fs'

const PYTHON = '/usr/bin/python3'

export function requireSkimage(): void {
  const hint = 'Install it with: apt-get install python3-skimage'
  if (!existsSync(PYTHON)) throw new Error(`${PYTHON} is missing: this check compares against scikit-image. ${hint}`)
  try {
    execFileSync(PYTHON, ['-c', 'import skimage'], { stdio: 'pipe' })
  } catch {
    throw new Error(`scikit-image cannot be imported by ${PYTHON}: this check compares against it. ${hint}`)
  }
}

/** Run `script` with `input` on its standard input; returns its standard output. */
export function python(script: string, input: Buffer | string = ''): Buffer {
  requireSkimage()
  return execFileSync(PYTHON, ['-c', script], { input, maxBuffer: 512 * 1024 * 1024 })
}
