// Route glue for a layered revision's layer files (the same route for each kind of file):
// the revision found in the viewer's scope (another team's answers 404), then its layer.
// Auto-imported into routes.
import { createError, defineEventHandler, getRouterParam, type H3Event } from 'h3'
import { MAX_LAYERS } from '#shared/types/layers'
import { useDb, type Db } from '../platform/db'
import { findRevision, findRevisionLayer, type RevisionLayerRow } from '../artworks/queries'
import { authorize, requireActor } from './actor'
import { sendRevisionFile } from './downloads'
import { idParam } from './request'

/** GET one layer's clean vector, prepared bitmap or raw outline: /api/revisions/[id]/layers/[position]/… */
export function revisionLayerFileHandler(kind: 'vector' | 'prepared' | 'outline') {
  return defineEventHandler(async (event) => {
    const actor = await requireActor(event)
    const db = useDb()
    const revision = authorize(actor, 'artwork.view', await findRevision(db, actor, idParam(event)), 'No such revision.')
    return sendRevisionFile(event, revision, kind, await layerOfRoute(event, db, revision.id))
  })
}

/** The revision's layer named by the route's [position], or 404. */
export async function layerOfRoute(event: H3Event, db: Db, revisionId: number): Promise<RevisionLayerRow> {
  const raw = getRouterParam(event, 'position') ?? ''
  const position = /^[0-9]$/.test(raw) ? Number(raw) : -1
  const layer = position >= 0 && position < MAX_LAYERS ? await findRevisionLayer(db, revisionId, position) : undefined
  if (!layer) throw createError({ statusCode: 404, message: 'No such layer.' })
  return layer
}
