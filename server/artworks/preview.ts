import sharp from 'sharp'
import { createError } from 'h3'
import type { Preview, PreviewColour } from '#shared/types/artworks'
import type { CleanUpChoice } from '#shared/types/pipeline'
import { PREVIEW_SOURCE_SIDE, scaleSourceGeometry, type PipelineSettings } from '#shared/utils/settings'
import type { Db } from '../platform/db'
import { getObject } from '../platform/object-store'
import { latestSource, type ArtworkRow } from './queries'
import type { ColourSettings } from '#shared/utils/colour-settings'
import type { LayeredRunRequest } from '../pipeline/colour/run-layers'
import { layersAsAsked } from '../pipeline/colour/upload'
import { runColourInPool, runInPool } from '../platform/pipeline-pool'
import { parseSettingsOr400 } from './service'

// The tuning bench asks for a preview each time a control settles. Decoding a 12 MP photo
// every time would take most of the time budget, so each source is shrunk once to a
// preview source (upright, long side PREVIEW_SOURCE_SIDE, uncompressed PNG that decodes in
// milliseconds) and kept in memory, bounded by total size, oldest out first.
const CACHE_LIMIT_BYTES = 512 * 1024 * 1024

interface PreviewSource { png: Uint8Array; scale: number; width: number; height: number }
const cache = new Map<string, Promise<PreviewSource>>()
const sizes = new Map<string, number>()
let cached = 0

async function makePreviewSource(key: string): Promise<PreviewSource> {
  const bytes = await getObject(key)
  const meta = await sharp(bytes).metadata()
  const uprightWidth = meta.autoOrient?.width ?? meta.width ?? 1
  const { data, info } = await sharp(bytes, { failOn: 'error' }).autoOrient()
    .resize({ width: PREVIEW_SOURCE_SIDE, height: PREVIEW_SOURCE_SIDE, fit: 'inside', withoutEnlargement: true })
    .png({ compressionLevel: 0 }).toBuffer({ resolveWithObject: true })
  return { png: new Uint8Array(data.buffer, data.byteOffset, data.byteLength), scale: info.width / uprightWidth, width: info.width, height: info.height }
}

function previewSource(key: string): Promise<PreviewSource> {
  const hit = cache.get(key)
  if (hit) {
    cache.delete(key)
    cache.set(key, hit)
    return hit
  }
  const made = makePreviewSource(key)
  cache.set(key, made)
  made.then((s) => {
    sizes.set(key, s.png.byteLength)
    cached += s.png.byteLength
    for (const k of cache.keys()) {
      if (cached <= CACHE_LIMIT_BYTES) break
      cache.delete(k)
      cached -= sizes.get(k) ?? 0
      sizes.delete(k)
    }
  }, () => cache.delete(key))
  return made
}

/**
 * The run's choices as they apply to the whole source: corners the analysis found on the
 * preview source are given back in source pixels (to a tenth of a pixel, on the picture), so
 * pinning them on the bench means the same corners for the saved revision.
 */
function choicesOnSource(choices: CleanUpChoice[], settings: PipelineSettings, s: PreviewSource, source: { width_px: number; height_px: number }): CleanUpChoice[] {
  if (s.scale === 1) return choices
  const onSource = (v: number, max: number) => Math.min(max, Math.max(0, Math.round((v / s.scale) * 10) / 10))
  return choices.map((c) => {
    if (c.setting !== 'corners' || c.value.mode !== 'manual') return c
    if (!c.automatic && settings.corners.mode === 'manual') return { ...c, value: settings.corners }
    const points = c.value.points.map((p) => ({ x: onSource(p.x, source.width_px), y: onSource(p.y, source.height_px) })) as typeof c.value.points
    return { ...c, value: { mode: 'manual', points } }
  })
}

/**
 * The bench's live outline: the same pipeline at screen resolution; nothing is stored. The
 * caller has checked `artwork.revise`. A preview whose request was withdrawn (the bench moved
 * on and aborted it) leaves the queue instead of being computed for nobody; one already
 * running finishes, as a thread cannot be stopped half-way without losing it.
 */
export async function previewArtwork(db: Db, artwork: ArtworkRow, input: { settings: unknown; widthMm: number; colour?: ColourSettings }, signal?: AbortSignal): Promise<Preview> {
  const settings = parseSettingsOr400(input.settings)
  const source = await latestSource(db, artwork.id)
  const c = settings.crop
  if (c && (c.x + c.width > source.width_px || c.y + c.height > source.height_px)) {
    throw createError({ statusCode: 422, message: `The crop rectangle lies outside the source of ${source.width_px} × ${source.height_px} pixels.` })
  }
  const small = await previewSource(source.object_key)
  // A copy crosses to the worker; the cached bytes stay here.
  const scaled = scaleSourceGeometry(settings, small.scale, small.width, small.height)
  const single = runInPool({ source: small.png.slice(), settings: scaled, widthMm: input.widthMm, purpose: 'preview', sourceKey: `${source.content_hash} preview` }, signal)
  // The layers on the frame the outline's clean-up chose (its corners are the preview source's, as these settings are).
  const colour = input.colour ? previewColour({ source: small.png.slice(), settings: scaled, widthMm: input.widthMm, purpose: 'preview' }, input.colour, single.then((r) => r.choices)) : null
  colour?.catch(() => undefined)
  const result = await single
  return {
    colour: await colour,
    svg: result.cleanSvg,
    preparedPng: `data:image/png;base64,${Buffer.from(result.preparedPng).toString('base64')}`,
    histogram: result.histogram,
    measurements: result.measurements,
    timings: result.timings,
    choices: choicesOnSource(result.choices, settings, small, source),
  }
}

/** The colour layers of the preview, beside its one-colour outline (the same shrunk source, in the same pool). */
async function previewColour(req: LayeredRunRequest, asked: ColourSettings, choices: Promise<CleanUpChoice[]>): Promise<PreviewColour> {
  const made = await layersAsAsked(runColourInPool, req, asked, choices)
  const found = (made.found ?? []).map(({ name, hex, share, tooSmall }) => ({ name, hex, share, tooSmall }))
  if (made.kind === 'single') return { found, layers: [], stackedSvg: null, sentence: made.why }
  return { found, layers: made.result.layers.map((l) => ({ name: l.name, hex: l.hex })), stackedSvg: made.result.stackedSvg, sentence: made.colour.sentence }
}
