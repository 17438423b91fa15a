import { CUT_SHEET_LIMITS, WEEDING_LINE_LIMITS } from '#shared/constants/cut-sheet'

// The cut sheet's options, kept in the address (so a sheet can be bookmarked on the lab
// computer): the number boxes, their checks, the query the API is asked with, and file links.

type Dim = keyof typeof CUT_SHEET_LIMITS | keyof typeof WEEDING_LINE_LIMITS
const LIMITS: Record<Dim, { min: number; max: number; default: number }> = { ...CUT_SHEET_LIMITS, ...WEEDING_LINE_LIMITS }
const DIMS = Object.keys(LIMITS) as Dim[]

function one(v: unknown): string | undefined {
  const s = Array.isArray(v) ? v[0] : v
  return typeof s === 'string' && s.trim() ? s.trim() : undefined
}

export function useSheetOptions() {
  const route = useRoute()
  const router = useRouter()

  function dim(key: Dim): number {
    const raw = one(route.query[key])
    const n = raw === undefined ? Number.NaN : Number(raw)
    const l = LIMITS[key]
    return Number.isFinite(n) && n >= l.min && n <= l.max ? n : l.default
  }
  /** What the API is asked with (absent: the default). */
  const options = computed(() => {
    const kerf = one(route.query.kerf)
    return {
      mirror: one(route.query.mirror) === '1' ? '1' as const : '0' as const,
      labels: one(route.query.labels) === 'ids' ? 'ids' as const : 'text' as const,
      weeding: one(route.query.weeding) === '1' ? '1' as const : '0' as const,
      // Only "off" is chosen here; otherwise the film's own kerf applies.
      ...(kerf === '0' ? { kerf: '0' } : {}),
      ...Object.fromEntries(DIMS.map((k) => [k, dim(k)])) as Record<Dim, number>,
    }
  })
  const wantedSheet = computed(() => {
    const n = Number(one(route.query.sheet))
    return Number.isInteger(n) && n > 0 ? n : 1
  })

  function setQuery(change: Record<string, string | number | undefined>) {
    const merged: Record<string, string | number | undefined> = { ...route.query as Record<string, string>, ...change }
    const next: Record<string, string> = {}
    for (const [k, v] of Object.entries(merged)) if (v !== undefined && v !== '') next[k] = String(v)
    return router.replace({ query: next })
  }
  /** A yes/no option as a checkbox's model; a change of layout starts again at the first sheet. */
  const flag = (key: 'mirror' | 'weeding', on = '1') => computed({
    get: () => options.value[key] === on,
    set: (v: boolean) => { void setQuery({ [key]: v ? on : undefined, sheet: undefined }) },
  })
  const mirror = flag('mirror')
  const weeding = flag('weeding')
  const kerfOff = computed({
    get: () => options.value.kerf === '0',
    set: (v: boolean) => { void setQuery({ kerf: v ? '0' : undefined, sheet: undefined }) },
  })
  const labels = computed({
    get: () => options.value.labels,
    set: (v: 'text' | 'ids') => { void setQuery({ labels: v === 'text' ? undefined : v, sheet: undefined }) },
  })

  // The number boxes hold what is typed; the address (and so the sheet) changes once a value is valid.
  const typed = reactive(Object.fromEntries(DIMS.map((k) => [k, String(options.value[k])])) as Record<Dim, string | number>)
  const dimErrors = reactive(Object.fromEntries(DIMS.map((k) => [k, ''])) as Record<Dim, string>)
  watch(options, (o) => {
    for (const k of DIMS) if (Number(typed[k]) !== o[k]) typed[k] = String(o[k])
  })
  function commit(key: Dim) {
    const l = LIMITS[key]
    // Vue hands a number box's value over as a number once it parses, as a string otherwise.
    const raw = String(typed[key] ?? '').trim()
    const n = raw === '' ? l.default : Number(raw)
    if (!Number.isFinite(n) || n < l.min || n > l.max) {
      dimErrors[key] = `Between ${l.min} and ${l.max} mm.`
      return
    }
    dimErrors[key] = ''
    typed[key] = String(n)
    void setQuery({ [key]: n === l.default ? undefined : n, sheet: undefined })
  }

  /** A sheet's file with these options. */
  function fileUrl(base: string, format: 'svg' | 'dxf', sheet: number): string {
    const q = new URLSearchParams({ sheet: String(sheet) })
    for (const [k, v] of Object.entries(options.value)) q.set(k, String(v))
    return `${base}/cut-sheet.${format}?${q}`
  }

  return { LIMITS, options, wantedSheet, setQuery, mirror, weeding, kerfOff, labels, typed, dimErrors, commit, fileUrl }
}
