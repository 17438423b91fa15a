// The view shared by the bench's panels (see components/bench/BenchViews.vue).
import type { InjectionKey, Ref } from 'vue'
import type { ViewSize, ViewState } from './bench-view'

export interface BenchViewContext {
  view: Ref<ViewState>
  world: Ref<ViewSize>
}

export const BENCH_VIEW_KEY: InjectionKey<BenchViewContext> = Symbol('bench-view')
