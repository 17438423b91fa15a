import { defineStore } from 'pinia'
import type { ArtworkDetail, Preview, RevisionDetail, RevisionSummary } from '#shared/types/artworks'
import type { ColourSettingsInput } from '#shared/utils/colour-settings'
import type { Film } from '#shared/types/films'
import type { CleanUpChoice, Measurements } from '#shared/types/pipeline'
import { estimateCutSeconds } from '#shared/utils/cut-time'
import { latestOnly, type LatestOnlyInfo } from '~/utils/latest-only'
import { cloneSettings, decalSizeMm, normaliseSettings, sameSettings, settingsKey, SETTING_LIMITS, type BenchSettings } from '~/utils/bench-settings'
import { chooseOption, keepChoice, type ChoiceOption, type OverridableSetting } from '~/utils/bench-choices'
import type { Corners } from '~/utils/bench-corners'
import { benchWarnings, type BenchWarning } from '~/utils/bench-warnings'
import { parseOutlineSvg } from '~/utils/outline-svg'
import { apiProblem, submissionKey, type ApiProblem } from '~/utils/api'

/** Quiet time after the last change before a preview is asked for, ms. */
export const PREVIEW_DELAY_MS = 150
/** How many round-trip figures the bench keeps (for its read-out and the browser tests). */
const ROUND_TRIPS_KEPT = 200

export interface RoundTrip {
  /** From the request leaving the browser to the new outline drawn, ms. */
  requestMs: number
  /** From the last change of a setting to the new outline drawn, ms. */
  sinceChangeMs: number
  /** The server's own pipeline time, ms. */
  serverMs: number
}

interface PreviewInput { artworkId: number; settings: BenchSettings; widthMm: number }

const nextFrame = () => new Promise<void>((resolve) => {
  if (typeof requestAnimationFrame === 'function') requestAnimationFrame(() => resolve())
  else resolve()
})

/**
 * The tuning bench: one artwork, the revision the designer started from, the settings being
 * steered, and the newest preview of them. Previews are debounced and only the newest
 * answer is shown (utils/latest-only.ts).
 */
export const useBenchStore = defineStore('bench', () => {
  const artworkId = ref<number | null>(null)
  const artwork = shallowRef<ArtworkDetail | null>(null)
  /** The revision whose settings the bench started from (or last saved). */
  const base = shallowRef<RevisionDetail | null>(null)
  const settings = ref<BenchSettings>(normaliseSettings({}))
  const widthMm = ref(150)

  const preview = shallowRef<Preview | null>(null)
  /** Settings and width the shown preview was made with. */
  const previewOf = shallowRef<{ settings: BenchSettings; widthMm: number } | null>(null)
  /** The starting revision's stored outline, for a viewer who may not ask for previews. */
  const baseOutline = shallowRef<ReturnType<typeof parseOutlineSvg>>(null)
  const pending = ref(false)
  const error = shallowRef<ApiProblem | null>(null)
  const loading = ref(false)
  const loadError = shallowRef<unknown>(null)
  const saving = ref(false)
  const saveError = shallowRef<ApiProblem | null>(null)
  const lastSaved = shallowRef<RevisionDetail | null>(null)
  const roundTrips = ref<RoundTrip[]>([])
  /** Film stock the design can be checked against (chlorine-free, not retired), and the choice. */
  const films = shallowRef<Film[]>([])
  const filmId = ref<number | null>(null)

  let lastSentKey = ''
  const previewer = latestOnly<PreviewInput, Preview>({
    delayMs: PREVIEW_DELAY_MS,
    run: (input, signal) => {
      lastSentKey = settingsKey(input.settings, input.widthMm)
      return $fetch<Preview>(`/api/artworks/${input.artworkId}/preview`, {
        method: 'POST',
        body: { settings: input.settings, widthMm: input.widthMm },
        signal,
      })
    },
    onResult: async (answer, input, info: LatestOnlyInfo) => {
      preview.value = answer
      previewOf.value = { settings: input.settings, widthMm: input.widthMm }
      error.value = null
      // Measured to the frame the new outline is drawn in.
      await nextTick()
      await nextFrame()
      const drawn = performance.now()
      roundTrips.value = [...roundTrips.value.slice(-(ROUND_TRIPS_KEPT - 1)), {
        requestMs: Math.round(drawn - info.sentAt),
        sinceChangeMs: Math.round(drawn - info.changedAt),
        serverMs: Math.round(answer.timings.totalMs),
      }]
    },
    onError: (err) => {
      // The same settings may be asked for again (after a dropped connection, say).
      lastSentKey = ''
      error.value = apiProblem(err)
    },
    onPendingChange: (p) => { pending.value = p },
  })

  function snapshot(): PreviewInput | null {
    if (artworkId.value === null) return null
    const w = widthMm.value
    if (!(w >= SETTING_LIMITS.widthMm.min && w <= SETTING_LIMITS.widthMm.max)) return null
    return { artworkId: artworkId.value, settings: cloneSettings(settings.value), widthMm: w }
  }

  // Every change of a setting or the width asks for a preview after the quiet time.
  let quiet = false
  watch([settings, widthMm], () => {
    if (quiet) return
    const s = snapshot()
    if (s) previewer.schedule(s)
  }, { deep: true, flush: 'sync' })

  /**
   * Ask now rather than after the quiet time: a control was let go. After a tick, so a
   * v-model listening to the same event has written its value first.
   */
  function commit() {
    nextTick(() => {
      const s = snapshot()
      // Letting go without a change (a click on the marker where it already was) asks nothing.
      if (s && (previewer.waiting || settingsKey(s.settings, s.widthMm) !== lastSentKey)) previewer.flush(s)
    })
  }

  /** The colour layers as set on the bench's colour panel; null: found and decided automatically. */
  const colour = ref<ColourSettingsInput | null>(null)

  function applyBase(detail: RevisionDetail) {
    quiet = true
    base.value = detail
    settings.value = normaliseSettings(detail.settings)
    widthMm.value = detail.drawingWidthMm
    colour.value = detail.colour?.asked ?? null
    quiet = false
  }

  async function open(id: number) {
    previewer.cancel()
    lastSentKey = ''
    artworkId.value = id
    artwork.value = null
    base.value = null
    preview.value = null
    previewOf.value = null
    baseOutline.value = null
    error.value = null
    saveError.value = null
    lastSaved.value = null
    roundTrips.value = []
    loadError.value = null
    loading.value = true
    loadFilms()
    try {
      const detail = await $fetch<ArtworkDetail>(`/api/artworks/${id}`)
      if (artworkId.value !== id) return
      artwork.value = detail
      const newest = detail.revisions[0]
      if (newest) {
        const rev = await $fetch<RevisionDetail>(`/api/revisions/${newest.id}`)
        if (artworkId.value !== id) return
        applyBase(rev)
        if (detail.can['artwork.revise']) commit()
        else {
          // No previews for someone who may not tune: show the stored outline instead.
          const svg = await $fetch<string>(rev.files.vector, { responseType: 'text' })
          if (artworkId.value === id) baseOutline.value = parseOutlineSvg(svg)
        }
      }
    } catch (err) {
      if (artworkId.value === id) loadError.value = err
    } finally {
      if (artworkId.value === id) loading.value = false
    }
  }

  /** Take another revision's settings and size as the starting point. */
  async function startFrom(revisionId: number) {
    const rev = await $fetch<RevisionDetail>(`/api/revisions/${revisionId}`)
    applyBase(rev)
    commit()
  }

  /** Back to the settings of the revision the bench started from. */
  function reset() {
    if (!base.value) return
    applyBase(base.value)
    commit()
  }

  function close() {
    previewer.cancel()
    artworkId.value = null
  }

  const nextNumber = computed(() => (artwork.value?.revisions[0]?.number ?? 0) + 1)
  const dirty = computed(() => !!base.value && (!sameSettings(settings.value, widthMm.value, normaliseSettings(base.value.settings), base.value.drawingWidthMm)
    || JSON.stringify(colour.value ?? null) !== JSON.stringify(base.value.colour?.asked ?? null)))
  const world = computed(() => base.value?.source ? { width: base.value.source.widthPx, height: base.value.source.heightPx } : null)
  /** The decal's own picture (prepared bitmap pixels) that the prepared and outline panels show. */
  const decalWorld = computed(() => {
    const m = preview.value?.measurements ?? base.value?.measurements
    return m ? { width: m.preparedWidthPx, height: m.preparedHeightPx } : null
  })
  /** The decal's size for the width and margin on the controls, from the newest run's proportions. */
  const decalSize = computed(() => {
    const known = previewOf.value && preview.value
      ? { drawingWidthMm: previewOf.value.widthMm, marginMm: previewOf.value.settings.marginMm, widthMm: preview.value.measurements.widthMm, heightMm: preview.value.measurements.heightMm }
      : base.value ? { drawingWidthMm: base.value.drawingWidthMm, marginMm: normaliseSettings(base.value.settings).marginMm, widthMm: base.value.widthMm, heightMm: base.value.heightMm } : null
    return decalSizeMm(widthMm.value, settings.value.marginMm, known)
  })
  const outline = computed(() => (preview.value ? parseOutlineSvg(preview.value.svg) : null))
  const film = computed(() => films.value.find((f) => f.id === filmId.value) ?? null)
  /** What the clean-up chose, and why: the newest preview's, or the starting revision's. */
  const choices = computed<CleanUpChoice[]>(() => preview.value?.choices ?? base.value?.choices ?? [])
  /**
   * The figures the bench shows. With the settings of the starting (or just saved) revision on
   * the controls, that revision's own, as saved; otherwise the newest preview's, which are
   * estimates: a preview works on a coarser bitmap than a revision (Preview.measurements).
   */
  const figures = computed<{ measurements: Measurements; savedAs: number | null } | null>(() => {
    if (base.value && !dirty.value) return { measurements: base.value.measurements, savedAs: base.value.number }
    if (preview.value) return { measurements: preview.value.measurements, savedAs: null }
    return null
  })
  const warnings = computed<BenchWarning[]>(() => {
    const m = figures.value?.measurements
    if (!m) return []
    const f = film.value
    const area = useSessionStore().me?.program.laserWorkArea
    const workAreaMm = area ? { width: area.widthMm, height: area.heightMm } : null
    return benchWarnings(m, f
      ? { sheetMm: { width: f.sheetWidthMm, height: f.sheetHeightMm }, minStrokeMm: f.minFeatureMm, filmName: f.name, workAreaMm }
      : { workAreaMm })
  })
  /** Estimated cut time on the chosen film, seconds (outlines = pieces and holes). */
  const cutSeconds = computed(() => {
    const f = film.value
    const m = figures.value?.measurements
    if (!f || !m || !(f.laserSpeedMmS > 0)) return null
    return estimateCutSeconds({ cutLengthMm: m.cutLengthMm, pieces: m.pieces + m.holes, speedMmS: f.laserSpeedMmS, passes: f.laserPasses })
  })

  /** Keep a choice the pipeline made: its value written into the settings. */
  function keep(choice: CleanUpChoice) {
    settings.value = keepChoice(cloneSettings(settings.value), choice)
    commit()
  }
  /** Set a clean-up choice to "Automatic" or an explicit value. */
  function override(setting: OverridableSetting, option: ChoiceOption) {
    settings.value = chooseOption(cloneSettings(settings.value), setting, option)
    commit()
  }
  /** Straighten from these corners (a drag or a key asks for a preview when let go). */
  function setCorners(points: Corners) {
    settings.value.corners = { mode: 'manual', points: points.map((p) => ({ ...p })) as Corners }
  }
  /** A quarter turn, clockwise (1) or anticlockwise (-1). */
  function turn(by: 1 | -1) {
    settings.value.quarterTurns = (settings.value.quarterTurns + by + 4) % 4
    commit()
  }
  /** A warning's one-click fix. */
  function applyFix(fix: NonNullable<BenchWarning['oneClick']>) {
    settings.value.thickenToMm = fix.settings.thickenToMm
    commit()
  }

  async function loadFilms() {
    try {
      const all = await $fetch<Film[]>('/api/films')
      films.value = all.filter((f) => f.usable)
      if (filmId.value !== null && !films.value.some((f) => f.id === filmId.value)) filmId.value = null
    } catch {
      // Without film stock the bench checks against its stated defaults.
      films.value = []
    }
  }
  /** The shown preview is of other settings than those on the controls (one is on its way). */
  const stale = computed(() => !!previewOf.value && !sameSettings(previewOf.value.settings, previewOf.value.widthMm, settings.value, widthMm.value))

  // A save clicked twice, or retried after a lost answer, makes one revision.
  const saveKey = submissionKey()
  async function save(): Promise<RevisionDetail | null> {
    if (artworkId.value === null || saving.value) return null
    const s = snapshot()
    if (!s) return null
    saving.value = true
    saveError.value = null
    try {
      const rev = await $fetch<RevisionDetail>(`/api/artworks/${s.artworkId}/revisions`, {
        method: 'POST',
        // The colour panel's settings (BenchColours) go with the revision when set.
        body: { settings: s.settings, widthMm: s.widthMm, ...(colour.value ? { colour: colour.value } : {}) },
        headers: saveKey.headers(),
      })
      saveKey.settled()
      if (artwork.value && artwork.value.artwork.id === rev.artworkId) {
        const summary: RevisionSummary = {
          id: rev.id, number: rev.number, status: rev.status, widthMm: rev.widthMm, heightMm: rev.heightMm, drawingWidthMm: rev.drawingWidthMm,
          createdAt: rev.createdAt, author: rev.author, measurements: rev.measurements, layerCount: rev.layerCount, layers: rev.layers, colour: rev.colour,
        }
        const revisions = [summary, ...artwork.value.revisions.filter((r) => r.id !== rev.id)].sort((a, b) => b.number - a.number)
        artwork.value = {
          ...artwork.value,
          artwork: { ...artwork.value.artwork, revisionCount: revisions.length, latestRevision: { id: revisions[0]!.id, number: revisions[0]!.number, status: revisions[0]!.status } },
          revisions,
        }
      }
      lastSaved.value = rev
      // The saved revision is the new starting point; the controls keep what they show.
      quiet = true
      base.value = rev
      quiet = false
      return rev
    } catch (err) {
      saveKey.settled(err)
      saveError.value = apiProblem(err)
      return null
    } finally {
      saving.value = false
    }
  }

  return {
    artworkId, artwork, base, baseOutline, settings, widthMm, preview, previewOf, pending, error, loading, loadError,
    saving, saveError, lastSaved, roundTrips, films, filmId, colour,
    nextNumber, dirty, world, decalWorld, decalSize, outline, choices, figures, warnings, stale, film, cutSeconds,
    open, startFrom, reset, commit, save, close, keep, override, setCorners, turn, applyFix,
  }
})
