// The pipeline's plain modules in one import (no framework imports: usable from a request
// handler, a worker thread or a test). run.ts strings them together for one revision.
export * from './clean'
export * from './errors'
export * from './fidelity'
export * from './geometry'
export * from './lighting'
export * from './luma'
export * from './otsu'
export * from './prepare'
export * from '../../shared/utils/settings'
export * from './svgpath'
export * from './trace'
