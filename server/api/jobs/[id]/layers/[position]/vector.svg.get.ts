import { createError, getRouterParam, setResponseHeaders } from 'h3'
import { MAX_LAYERS } from '#shared/types/layers'
import { useDb } from '#server/platform/db'
import { getObject } from '#server/platform/object-store'
import { findJob } from '#server/jobs/queries'
import { findRevisionLayer } from '#server/artworks/queries'

// One layer of a layered job's decal, for the job page's order of application: whoever may see
// the job (an operator of any team in the program) may see the layers laid with it.
export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  const db = useDb()
  const job = authorize(actor, 'job.view', await findJob(db, actor, idParam(event)), 'No such job.')
  const raw = getRouterParam(event, 'position') ?? ''
  const position = /^[0-9]$/.test(raw) ? Number(raw) : -1
  const layer = position >= 0 && position < MAX_LAYERS ? await findRevisionLayer(db, job.revision_id, position) : undefined
  if (!layer) throw createError({ statusCode: 404, message: 'No such layer.' })
  setResponseHeaders(event, {
    'content-type': 'image/svg+xml',
    // Content-addressed and immutable.
    'cache-control': 'private, max-age=31536000, immutable',
    'x-content-type-options': 'nosniff',
    'content-security-policy': "default-src 'none'; style-src 'unsafe-inline'; sandbox",
  })
  return getObject(layer.vector_key)
})
