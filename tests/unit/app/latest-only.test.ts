import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { latestOnly, type LatestOnlyInfo } from '../../../app/utils/latest-only'

// A request the test answers by hand, in any order it likes.
interface Call { input: string; signal: AbortSignal; resolve: (v: string) => void; reject: (e: unknown) => void }

function harness(delayMs = 150) {
  const calls: Call[] = []
  const results: { output: string; input: string; info: LatestOnlyInfo }[] = []
  const errors: { error: unknown; input: string }[] = []
  const pendingLog: boolean[] = []
  const l = latestOnly<string, string>({
    delayMs,
    run: (input, signal) => new Promise<string>((resolve, reject) => { calls.push({ input, signal, resolve, reject }) }),
    onResult: (output, input, info) => { results.push({ output, input, info }) },
    onError: (error, input) => { errors.push({ error, input }) },
    onPendingChange: (p) => { pendingLog.push(p) },
    timers: { setTimeout: (fn, ms) => setTimeout(fn, ms), clearTimeout: (h) => clearTimeout(h as ReturnType<typeof setTimeout>), now: () => Date.now() },
  })
  return { l, calls, results, errors, pendingLog }
}

/** Lets resolved promises hand on their answers. */
const settle = () => vi.advanceTimersByTimeAsync(0)

beforeEach(() => { vi.useFakeTimers() })
afterEach(() => { vi.useRealTimers() })

describe('debouncing', () => {
  it('sends one request, with the newest input, after the quiet time', async () => {
    const { l, calls } = harness()
    l.schedule('a')
    l.schedule('b')
    l.schedule('c')
    await vi.advanceTimersByTimeAsync(149)
    expect(calls).toHaveLength(0)
    await vi.advanceTimersByTimeAsync(1)
    expect(calls.map((c) => c.input)).toEqual(['c'])
    expect(l.sent).toBe(1)
  })

  it('restarts the quiet time with every change', async () => {
    const { l, calls } = harness()
    l.schedule('a')
    await vi.advanceTimersByTimeAsync(100)
    l.schedule('b')
    await vi.advanceTimersByTimeAsync(100)
    expect(calls).toHaveLength(0)
    await vi.advanceTimersByTimeAsync(50)
    expect(calls.map((c) => c.input)).toEqual(['b'])
  })

  it('flush() sends at once (a control was let go) and cancels the timer', async () => {
    const { l, calls } = harness()
    l.schedule('a')
    await vi.advanceTimersByTimeAsync(20)
    l.flush()
    expect(calls.map((c) => c.input)).toEqual(['a'])
    await vi.advanceTimersByTimeAsync(500)
    expect(calls).toHaveLength(1)
  })

  it('flush(input) sends that input; flush() with nothing waiting sends nothing', async () => {
    const { l, calls } = harness()
    l.flush()
    expect(calls).toHaveLength(0)
    l.flush('x')
    expect(calls.map((c) => c.input)).toEqual(['x'])
    l.flush()
    expect(calls).toHaveLength(1)
  })

  it('a flushed change keeps the time it was made, for the round-trip figure', async () => {
    const { l, calls, results } = harness()
    const t0 = Date.now()
    l.schedule('a')
    await vi.advanceTimersByTimeAsync(40)
    l.flush('a')
    await vi.advanceTimersByTimeAsync(60)
    calls[0]!.resolve('A')
    await settle()
    expect(results[0]!.info.changedAt).toBe(t0)
    expect(results[0]!.info.sentAt).toBe(t0 + 40)
    expect(results[0]!.info.answeredAt).toBe(t0 + 100)
  })
})

describe('stale answers', () => {
  it('drops an older answer that arrives after a newer one', async () => {
    const { l, calls, results } = harness()
    l.schedule('a')
    await vi.advanceTimersByTimeAsync(150)
    l.schedule('b')
    await vi.advanceTimersByTimeAsync(150)
    expect(calls.map((c) => c.input)).toEqual(['a', 'b'])
    calls[1]!.resolve('B')
    await settle()
    calls[0]!.resolve('A') // late, and ignoring its abort signal
    await settle()
    expect(results.map((r) => r.output)).toEqual(['B'])
    expect(l.dropped).toBe(1)
  })

  it('drops an older answer that arrives first, once a newer request is out', async () => {
    const { l, calls, results } = harness()
    l.schedule('a')
    await vi.advanceTimersByTimeAsync(150)
    l.schedule('b')
    await vi.advanceTimersByTimeAsync(150)
    calls[0]!.resolve('A')
    await settle()
    expect(results).toHaveLength(0)
    calls[1]!.resolve('B')
    await settle()
    expect(results.map((r) => [r.input, r.output])).toEqual([['b', 'B']])
  })

  it('aborts the request in flight when a newer one goes out', async () => {
    const { l, calls } = harness()
    l.schedule('a')
    await vi.advanceTimersByTimeAsync(150)
    expect(calls[0]!.signal.aborted).toBe(false)
    l.schedule('b')
    // A change while a request is in flight waits for its quiet time, then supersedes it.
    expect(calls[0]!.signal.aborted).toBe(false)
    await vi.advanceTimersByTimeAsync(150)
    expect(calls[0]!.signal.aborted).toBe(true)
    expect(calls[1]!.signal.aborted).toBe(false)
  })

  it('applies an answer that arrives while the next change is still in its quiet time', async () => {
    // The request was the newest sent; showing it beats showing nothing while the designer drags.
    const { l, calls, results } = harness()
    l.schedule('a')
    await vi.advanceTimersByTimeAsync(150)
    l.schedule('b')
    calls[0]!.resolve('A')
    await settle()
    expect(results.map((r) => r.output)).toEqual(['A'])
    expect(l.pending).toBe(true)
    await vi.advanceTimersByTimeAsync(150)
    calls[1]!.resolve('B')
    await settle()
    expect(results.map((r) => r.output)).toEqual(['A', 'B'])
  })

  it('a fast series of answers out of order shows only the newest', async () => {
    const { l, calls, results } = harness(10)
    for (const s of ['1', '2', '3', '4', '5']) {
      l.schedule(s)
      await vi.advanceTimersByTimeAsync(10)
    }
    for (const i of [4, 2, 0, 3, 1]) calls[i]!.resolve(`answer ${calls[i]!.input}`)
    await settle()
    expect(results.map((r) => r.output)).toEqual(['answer 5'])
    expect(calls.slice(0, 4).every((c) => c.signal.aborted)).toBe(true)
  })
})

describe('pending flag and errors', () => {
  it('is pending from the first change until the newest answer is in', async () => {
    const { l, calls, pendingLog } = harness()
    expect(l.pending).toBe(false)
    l.schedule('a')
    expect(l.pending).toBe(true)
    await vi.advanceTimersByTimeAsync(150)
    l.schedule('b')
    await vi.advanceTimersByTimeAsync(150)
    calls[0]!.resolve('A')
    await settle()
    expect(l.pending).toBe(true)
    calls[1]!.resolve('B')
    await settle()
    expect(l.pending).toBe(false)
    expect(pendingLog).toEqual([true, false])
  })

  it('reports the newest request\'s failure, and never an aborted one\'s', async () => {
    const { l, calls, errors, results } = harness()
    l.schedule('a')
    await vi.advanceTimersByTimeAsync(150)
    l.schedule('b')
    await vi.advanceTimersByTimeAsync(150)
    calls[0]!.reject(Object.assign(new Error('aborted'), { name: 'AbortError' }))
    calls[1]!.reject(new Error('422 too complex'))
    await settle()
    expect(errors.map((e) => [e.input, (e.error as Error).message])).toEqual([['b', '422 too complex']])
    expect(results).toHaveLength(0)
    expect(l.pending).toBe(false)
  })

  it('a throwing run counts as a failed request', async () => {
    const errors: unknown[] = []
    const l = latestOnly<string, string>({
      delayMs: 5,
      run: () => { throw new Error('no network') },
      onResult: () => {},
      onError: (e) => { errors.push(e) },
    })
    l.flush('a')
    await settle()
    expect((errors[0] as Error).message).toBe('no network')
    expect(l.pending).toBe(false)
  })

  it('cancel() forgets what waits, aborts what is in flight, and reports nothing more', async () => {
    const { l, calls, results, errors } = harness()
    l.schedule('a')
    await vi.advanceTimersByTimeAsync(150)
    l.schedule('b')
    l.cancel()
    expect(l.pending).toBe(false)
    expect(calls[0]!.signal.aborted).toBe(true)
    calls[0]!.resolve('A')
    await vi.advanceTimersByTimeAsync(500)
    expect(calls).toHaveLength(1)
    expect(results).toHaveLength(0)
    expect(errors).toHaveLength(0)
    // And it works again afterwards.
    l.flush('c')
    calls[1]!.resolve('C')
    await settle()
    expect(results.map((r) => r.output)).toEqual(['C'])
  })
})
