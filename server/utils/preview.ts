import type { Preview } from '#shared/types/artworks'
import type { Actor } from './actor'

// Sources of recent previews, kept in memory so a slider's stream of previews does not fetch
// the same bytes from object storage each time. Bounded by total size; oldest out first.
const CACHE_LIMIT_BYTES = 256 * 1024 * 1024
const cache = new Map<string, Uint8Array>()
let cached = 0

async function sourceBytes(key: string): Promise<Uint8Array> {
  const hit = cache.get(key)
  if (hit) {
    cache.delete(key)
    cache.set(key, hit)
    return hit
  }
  const bytes = new Uint8Array(await getObject(key))
  cache.set(key, bytes)
  cached += bytes.byteLength
  for (const [k, v] of cache) {
    if (cached <= CACHE_LIMIT_BYTES) break
    cache.delete(k)
    cached -= v.byteLength
  }
  return bytes
}

export async function previewArtwork(actor: Actor, artworkId: number, input: { settings: unknown; widthMm: number }): Promise<Preview> {
  const artwork = await findArtwork(actor, artworkId)
  if (!canActInTeam(actor, artwork.team_id, 'designer')) throw createError({ statusCode: 403, message: 'Only a designer or a mentor may tune the outline.' })
  const settings = parseSettingsOr400(input.settings)
  const source = await latestSource(artworkId)
  // A copy crosses to the worker; the cached bytes stay here.
  const result = await runInPool({ source: (await sourceBytes(source.object_key)).slice(), settings, widthMm: input.widthMm, purpose: 'preview' })
  return {
    svg: result.cleanSvg,
    preparedPng: `data:image/png;base64,${Buffer.from(result.preparedPng).toString('base64')}`,
    histogram: result.histogram,
    measurements: result.measurements,
    timings: result.timings,
  }
}
