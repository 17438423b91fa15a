// Entry of the colour-layer worker threads (piscina): the tasks of tasks.ts. When bundling,
// keep sharp, potrace and svgo external, as for the single-colour worker.
import sharp from 'sharp'
import { colourWork } from './tasks'

// As in the single-colour worker: one thread is one core's worth of work. Process-wide, so
// this file is loaded in worker threads only.
sharp.concurrency(1)
sharp.cache(false)

export type { ColourAnswer, ColourTask } from './tasks'
export default colourWork
