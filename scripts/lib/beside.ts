// Runs the floors' commands (Debian potrace) from a small shell beside the bench, so the bench's
// own process never forks between the runs it times.
//
// Why: Node starts a child by fork() (libuv, on Linux), which marks every writable page of the
// bench's process copy-on-write. The first write to each page afterwards faults, even once the
// child has exec'd (the mechanism as remembered, not looked up; the counts below are
// measured). Measured on this machine with a 1 MP upload run just after an
// execFileSync(potrace): 11,067 minor faults a run against 1,476 without, and 336 ms against
// 203. The server's pipeline threads never fork, so the bench must not charge them for it.
import { spawn, type ChildProcess } from 'node:child_process'
import { closeSync, constants, mkdtempSync, openSync, readSync, rmSync, writeSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'

export interface Beside {
  /** Runs file with args in the shell beside, synchronously; throws if it fails. */
  run(file: string, args: string[]): void
  close(): void
}

const quote = (s: string) => `'${s.replaceAll('\'', `'\\''`)}'`

/**
 * Starts /bin/sh reading one command a line from a FIFO and answering its exit status on
 * another. The bench forks once, here, before anything is timed.
 */
export function besideShell(): Beside {
  const dir = mkdtempSync(path.join(os.tmpdir(), 'dw-beside-'))
  const ask = path.join(dir, 'ask'), answer = path.join(dir, 'answer')
  const shell: ChildProcess = spawn('/bin/sh', ['-c', `mkfifo "$1" "$2" && exec 3<"$1" 4>"$2" && while IFS= read -r line <&3; do eval "$line" >/dev/null 2>&1 </dev/null; echo "$?" >&4; done`, 'beside', ask, answer],
    { stdio: 'ignore' })
  let failed: Error | null = null
  shell.on('error', (e) => { failed = e })
  // The shell makes the FIFOs and opens its ends; wait for that without blocking on a shell
  // that never gets there: no O_CREAT (it must be the shell's FIFO), and O_NONBLOCK, with which
  // opening a FIFO to write fails (ENXIO) until its reader has it open.
  const until = Date.now() + 5000
  let askFd = -1
  while (askFd < 0) {
    try {
      askFd = openSync(ask, constants.O_WRONLY | constants.O_NONBLOCK)
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code
      if ((code !== 'ENOENT' && code !== 'ENXIO') || Date.now() > until || failed) {
        shell.kill()
        rmSync(dir, { recursive: true, force: true })
        throw failed ?? new Error(`The shell beside the bench did not start (${code}).`, { cause: e })
      }
      Atomics.wait(new Int32Array(new SharedArrayBuffer(4)), 0, 0, 5)
    }
  }
  // The shell opens the answer FIFO right after the ask FIFO, so this wait is short.
  const answerFd = openSync(answer, constants.O_RDONLY)
  const buf = Buffer.alloc(64)
  return {
    run(file, args) {
      writeSync(askFd, [file, ...args].map(quote).join(' ') + '\n')
      let reply = ''
      while (!reply.endsWith('\n')) {
        const n = readSync(answerFd, buf, 0, buf.length, null)
        if (n === 0) throw new Error('The shell beside the bench has stopped.')
        reply += buf.toString('utf8', 0, n)
      }
      if (reply.trim() !== '0') throw new Error(`${file} failed (exit status ${reply.trim()}).`)
    },
    close() {
      closeSync(askFd)
      closeSync(answerFd)
      shell.kill()
      rmSync(dir, { recursive: true, force: true })
    },
  }
}
