// The heap of the threads that make revisions. An upload's objects (the tracer's paths, svgo's
// tree) often outlive a young-generation collection and move to the old generation, whose
// first limit V8 sets from a small live heap: a pipeline thread then ran a full collection
// every few megabytes of such objects, one or two per 4 MP upload at some 20 ms each. A larger
// first limit lets those objects die young; the image buffers, held outside the heap, still
// bring collections of their own as they come and go. Counted with --trace-gc, 45 uploads at
// 4 MP in one thread: 62–83 full collections before, 15–17 after (README, Speed and memory).
import v8 from 'node:v8'

/** The old generation's first limit in a pipeline thread, MB (V8's --initial-old-space-size). */
export const PIPELINE_INITIAL_OLD_SPACE_MB = 96

/** V8 flags for the pipeline's threads; a process started with them has the same heap. */
export const PIPELINE_HEAP_FLAGS: readonly string[] = [`--initial-old-space-size=${PIPELINE_INITIAL_OLD_SPACE_MB}`]

let configured = false

/**
 * Sets PIPELINE_HEAP_FLAGS for the threads started after this call (V8 reads them when it
 * makes a thread's heap; the running thread's is made already). They are process-wide: other
 * pools started later get the same heap.
 */
export function configurePipelineHeap(): void {
  if (configured) return
  for (const flag of PIPELINE_HEAP_FLAGS) v8.setFlagsFromString(flag)
  configured = true
}
