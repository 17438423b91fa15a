// The shell beside the bench: the floors' commands run as its children, never as children of
// the bench's own process (whose fork would charge the next timed run of ours with
// copy-on-write faults), with their arguments as given and their failures reported.
import { mkdtempSync, readFileSync, rmSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { afterEach, beforeEach, describe, expect, it } from 'vitest'
import { besideShell, type Beside } from '../../../scripts/lib/beside'

let dir: string
let beside: Beside
beforeEach(() => { dir = mkdtempSync(path.join(os.tmpdir(), 'dw-beside-test-')); beside = besideShell() })
afterEach(() => { beside.close(); rmSync(dir, { recursive: true, force: true }) })

describe('besideShell', () => {
  it('starts each command from the shell, not from this process', () => {
    const out = path.join(dir, 'ppid')
    beside.run('/bin/sh', ['-c', 'echo "$PPID" > "$0"', out])
    const parent = Number(readFileSync(out, 'utf8').trim())
    expect(parent).toBeGreaterThan(0)
    expect(parent).not.toBe(process.pid)
    // …and that parent is the shell this process started, once.
    const grandparent = Number(readFileSync(`/proc/${parent}/stat`, 'utf8').split(') ')[1]!.split(' ')[1])
    expect(grandparent).toBe(process.pid)
  })

  it('hands the arguments over as given: spaces, quotes and dollars', () => {
    const out = path.join(dir, 'args')
    const args = ['two words', 'it\'s', '"double"', '$HOME', '-t', '5']
    beside.run('/bin/sh', ['-c', 'shift; printf "%s\\n" "$@" > "$0"', out, 'ignored', ...args])
    expect(readFileSync(out, 'utf8').split('\n').slice(0, -1)).toEqual(args)
  })

  it('reports a failing command with its exit status, and keeps running', () => {
    expect(() => beside.run('/bin/sh', ['-c', 'exit 3'])).toThrow('/bin/sh failed (exit status 3).')
    const out = path.join(dir, 'after')
    beside.run('/bin/sh', ['-c', 'echo ok > "$0"', out])
    expect(readFileSync(out, 'utf8')).toBe('ok\n')
  })
})
