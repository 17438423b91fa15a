// Debounced calls where only the newest answer counts: the tuning bench asks for a preview
// after every change of a setting, and the server's answers may come back in any order.
//
//  - schedule(input) remembers the newest input and (re)starts a quiet-time timer;
//  - when the timer runs out (or flush() is called, e.g. when a slider is let go) the input
//    is sent; a request still in flight is aborted, since its answer is already out of date;
//  - every request gets a sequence number, and only the answer to the newest request sent is
//    handed on, so a slow early answer can never overwrite a later one (aborting alone does
//    not guarantee that: a fetch may have resolved just before the abort);
//  - a change while a request is in flight simply schedules the next request.
//
// Plain TypeScript (no Vue, no Nuxt, no DOM beyond AbortController), so it is unit-tested
// with fake timers.

export interface LatestOnlyTimers {
  setTimeout: (fn: () => void, ms: number) => unknown
  clearTimeout: (handle: unknown) => void
  now: () => number
}

export interface LatestOnlyOptions<I, O> {
  /** Quiet time after the last schedule() before the request goes out, ms. */
  delayMs: number
  /** Does the work; should give up when the signal aborts. */
  run: (input: I, signal: AbortSignal) => Promise<O>
  /** The answer to the newest request. */
  onResult: (output: O, input: I, info: LatestOnlyInfo) => void
  /** The failure of the newest request (aborted requests are never reported). */
  onError?: (error: unknown, input: I, info: LatestOnlyInfo) => void
  /** True from the first schedule() until the newest request has settled with nothing waiting. */
  onPendingChange?: (pending: boolean) => void
  timers?: LatestOnlyTimers
}

export interface LatestOnlyInfo {
  /** Sequence number of the request, 1, 2, 3 … */
  seq: number
  /** When the request went out and when its answer arrived (timers.now()). */
  sentAt: number
  answeredAt: number
  /** When the input it carried was last changed (the schedule() or flush() call). */
  changedAt: number
}

export interface LatestOnly<I> {
  /** Remember the newest input and send it after the quiet time. */
  schedule: (input: I) => void
  /** Send now: the given input, or the one waiting for its quiet time. Does nothing when nothing waits. */
  flush: (input?: I) => void
  /** Forget what waits and abort what is in flight; nothing more is reported for them. */
  cancel: () => void
  readonly pending: boolean
  /** An input waits for its quiet time. */
  readonly waiting: boolean
  /** Requests sent so far. */
  readonly sent: number
  /** Answers dropped because a newer request had been sent meanwhile. */
  readonly dropped: number
}

const realTimers: LatestOnlyTimers = {
  setTimeout: (fn, ms) => globalThis.setTimeout(fn, ms),
  clearTimeout: (h) => globalThis.clearTimeout(h as ReturnType<typeof setTimeout>),
  now: () => (globalThis.performance ? globalThis.performance.now() : Date.now()),
}

export function isAbortError(err: unknown): boolean {
  const e = err as { name?: string; cause?: { name?: string } } | null
  return !!e && (e.name === 'AbortError' || e.cause?.name === 'AbortError')
}

export function latestOnly<I, O>(options: LatestOnlyOptions<I, O>): LatestOnly<I> {
  const timers = options.timers ?? realTimers
  let timer: unknown = null
  let waiting: { input: I; changedAt: number } | null = null
  let inFlight: { seq: number; controller: AbortController } | null = null
  let seq = 0
  let sentCount = 0
  let dropped = 0
  let pending = false

  function setPending(next: boolean) {
    if (next === pending) return
    pending = next
    options.onPendingChange?.(next)
  }

  function settle(mySeq: number) {
    if (inFlight?.seq === mySeq) inFlight = null
    if (!inFlight && !waiting) setPending(false)
  }

  function send() {
    if (timer !== null) {
      timers.clearTimeout(timer)
      timer = null
    }
    if (!waiting) return
    const { input, changedAt } = waiting
    waiting = null
    inFlight?.controller.abort()
    const mySeq = ++seq
    sentCount++
    const controller = new AbortController()
    inFlight = { seq: mySeq, controller }
    const sentAt = timers.now()
    let promise: Promise<O>
    try {
      promise = Promise.resolve(options.run(input, controller.signal))
    } catch (err) {
      promise = Promise.reject(err)
    }
    promise.then(
      (output) => {
        if (mySeq !== seq || controller.signal.aborted) {
          dropped++
          return
        }
        settle(mySeq)
        options.onResult(output, input, { seq: mySeq, sentAt, answeredAt: timers.now(), changedAt })
      },
      (err) => {
        if (mySeq !== seq || controller.signal.aborted || isAbortError(err)) {
          if (mySeq !== seq) dropped++
          return
        }
        settle(mySeq)
        options.onError?.(err, input, { seq: mySeq, sentAt, answeredAt: timers.now(), changedAt })
      },
    )
  }

  return {
    schedule(input: I) {
      waiting = { input, changedAt: timers.now() }
      setPending(true)
      if (timer !== null) timers.clearTimeout(timer)
      timer = timers.setTimeout(() => {
        timer = null
        send()
      }, options.delayMs)
    },
    flush(input?: I) {
      // A change waiting for its quiet time keeps its own time: that is when the change was made.
      if (input !== undefined) waiting = { input, changedAt: waiting?.changedAt ?? timers.now() }
      if (!waiting) return
      setPending(true)
      send()
    },
    cancel() {
      if (timer !== null) timers.clearTimeout(timer)
      timer = null
      waiting = null
      if (inFlight) {
        inFlight.controller.abort()
        inFlight = null
      }
      // A cancelled request's answer must never arrive: move the sequence on.
      seq++
      setPending(false)
    },
    get pending() { return pending },
    get waiting() { return waiting !== null },
    get sent() { return sentCount },
    get dropped() { return dropped },
  }
}
