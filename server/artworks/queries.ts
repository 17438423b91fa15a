import { createError } from 'h3'
import { sql, type NotNull } from 'kysely'
import { jsonArrayFrom, jsonObjectFrom } from 'kysely/helpers/postgres'
import type { Db } from '../platform/db'
import { teamScope, type Actor } from '../policy'

/** Artworks the actor may see, with their team, author and latest revision joined in. */
function visibleArtworks(db: Db, actor: Actor) {
  return db.selectFrom('artwork')
    .innerJoin('team', 'team.id', 'artwork.team_id')
    .innerJoin('users as author', 'author.id', 'artwork.author_id')
    .where(teamScope(actor, 'artwork.view'))
}

export interface ArtworkFilter { teamId?: number; q?: string }

function filtered(db: Db, actor: Actor, f: ArtworkFilter) {
  let q = visibleArtworks(db, actor)
  if (f.teamId) q = q.where('artwork.team_id', '=', f.teamId)
  if (f.q) q = q.where('artwork.title', 'ilike', `%${f.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`)
  return q
}

function withColumns(q: ReturnType<typeof visibleArtworks>) {
  return q.select((eb) => [
    'artwork.id', 'artwork.title', 'artwork.status', 'artwork.updated_at', 'artwork.created_at',
    'team.id as teamId', 'team.program_id as programId', 'team.name as team_name', 'team.colour as team_colour', 'author.name as author_name',
    // The exact timestamp, microseconds and all, for the next page's cursor.
    sql<string>`artwork.updated_at::text`.as('order_at'),
    // The latest revision with its own status: the artwork's may be an older revision's decision.
    jsonObjectFrom(eb.selectFrom('revision').innerJoin('revision_status', 'revision_status.revision_id', 'revision.id')
      .select(['revision.id', 'revision.number', 'revision_status.status'])
      .whereRef('revision.artwork_id', '=', 'artwork.id').orderBy('revision.number', 'desc').limit(1)).as('latest'),
    eb.selectFrom('revision').select(sql<number>`count(*)::int`.as('n')).whereRef('revision.artwork_id', '=', 'artwork.id').as('revision_count'),
  ])
}

export type ArtworkRow = Awaited<ReturnType<ReturnType<typeof withColumns>['executeTakeFirstOrThrow']>>

/** One page, most recently changed first, after the row `after` (the previous page's last). */
export function artworkPage(db: Db, actor: Actor, f: ArtworkFilter, after: { at: string; id: number } | undefined, limit: number) {
  let q = withColumns(filtered(db, actor, f))
  if (after) q = q.where(sql<boolean>`(artwork.updated_at, artwork.id) < (${after.at}::timestamptz, ${after.id})`)
  return q.orderBy('artwork.updated_at', 'desc').orderBy('artwork.id', 'desc').limit(limit).execute()
}

export async function artworkCount(db: Db, actor: Actor, f: ArtworkFilter): Promise<number> {
  const { total } = await filtered(db, actor, f).select(sql<number>`count(*)::int`.as('total')).executeTakeFirstOrThrow()
  return total
}

/** The artwork if the actor may see it. */
export function findArtwork(db: Db, actor: Actor, id: number): Promise<ArtworkRow | undefined> {
  return withColumns(visibleArtworks(db, actor)).where('artwork.id', '=', id).executeTakeFirst()
}

export function revisionsOf(db: Db, artworkId: number) {
  return db.selectFrom('revision').innerJoin('users', 'users.id', 'revision.author_id')
    .innerJoin('revision_status', 'revision_status.revision_id', 'revision.id')
    .select(['revision.id', 'revision.number', 'revision.width_mm', 'revision.height_mm', 'revision.drawing_width_mm', 'revision.created_at', 'revision.measurements', 'revision.layer_count', 'revision.colour', 'users.name as author_name', 'revision_status.status'])
    .where('revision.artwork_id', '=', artworkId).orderBy('revision.number', 'desc').execute()
}

/** A revision with its artwork, source and status, if the actor may see it. */
export function findRevision(db: Db, actor: Actor, revisionId: number) {
  return db.selectFrom('revision')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('team', 'team.id', 'artwork.team_id')
    .leftJoin('source', 'source.id', 'revision.source_id')
    .innerJoin('users', 'users.id', 'revision.author_id')
    .innerJoin('revision_status', 'revision_status.revision_id', 'revision.id')
    .selectAll('revision')
    .select(['revision_status.status', 'artwork.title', 'team.id as teamId', 'team.program_id as programId', 'team.name as team_name', 'users.name as author_name',
      'source.object_key as source_key', 'source.media_type', 'source.file_name', 'source.width_px', 'source.height_px', 'source.bytes', 'source.content_hash'])
    .where('revision.id', '=', revisionId)
    .where(teamScope(actor, 'artwork.view'))
    .executeTakeFirst()
}

export type RevisionRow = NonNullable<Awaited<ReturnType<typeof findRevision>>>

/** The layers of the revisions given, bottom first. The caller has found the revisions in the actor's scope. */
export function layersOf(db: Db, revisionIds: readonly number[]) {
  if (!revisionIds.length) return Promise.resolve([])
  return db.selectFrom('revision_layer').selectAll().where('revision_id', 'in', [...revisionIds]).orderBy('revision_id').orderBy('position').execute()
}

/** One layer of a revision the caller has found in the actor's scope. */
export function findRevisionLayer(db: Db, revisionId: number, position: number) {
  return db.selectFrom('revision_layer').selectAll().where('revision_id', '=', revisionId).where('position', '=', position).executeTakeFirst()
}

export type RevisionLayerRow = NonNullable<Awaited<ReturnType<typeof findRevisionLayer>>>

/** The source the bench tunes; a generated plate has none (409). */
export async function latestSource(db: Db, artworkId: number) {
  const source = await db.selectFrom('source').selectAll().where('artwork_id', '=', artworkId).orderBy('id', 'desc').limit(1).executeTakeFirst()
  if (!source) throw createError({ statusCode: 409, message: 'This artwork is a generated plate: it is an exact vector with no source to tune. Generate a new plate instead.' })
  return source
}

/**
 * The keys, of those given, that a row points at (a source or a revision's files) or that a
 * request has claimed (server/artworks/objects.ts). Every column that holds an object key is
 * listed here: the sweeper removes stored files this does not name.
 */
export async function keysInUse(db: Db, keys: readonly string[]): Promise<Set<string>> {
  if (!keys.length) return new Set()
  const list = [...keys]
  const rows = await db.selectFrom('source').select('object_key as key').where('object_key', 'in', list)
    .union(db.selectFrom('revision').select('prepared_key as key').where('prepared_key', 'in', list).$narrowType<{ key: string }>())
    .union(db.selectFrom('revision').select('outline_key as key').where('outline_key', 'in', list).$narrowType<{ key: string }>())
    .union(db.selectFrom('revision').select('vector_key as key').where('vector_key', 'in', list))
    // Each layer of a layered revision has files of its own.
    .union(db.selectFrom('revision_layer').select('prepared_key as key').where('prepared_key', 'in', list).$narrowType<{ key: string }>())
    .union(db.selectFrom('revision_layer').select('outline_key as key').where('outline_key', 'in', list).$narrowType<{ key: string }>())
    .union(db.selectFrom('revision_layer').select('vector_key as key').where('vector_key', 'in', list))
    .union(db.selectFrom('object_claim').select('key').where('key', 'in', list))
    // A source waiting in the work queue for its first revision.
    .union(db.selectFrom('work_item').select('source_key as key').where('source_key', 'in', list).where('state', 'in', ['queued', 'running']).$narrowType<{ key: NotNull }>())
    .execute()
  return new Set(rows.map((r) => r.key))
}

/**
 * Where the artwork's decals are: every placement (not removed) of any of its revisions, with
 * its robot, spot and film and the jobs that cut it, in one query. The robots are the
 * artwork's own team's, so whoever may see the artwork may see them.
 */
export function placementsOfArtwork(db: Db, artworkId: number) {
  return db.selectFrom('placement')
    .innerJoin('revision', 'revision.id', 'placement.revision_id')
    .innerJoin('robot', 'robot.id', 'placement.robot_id')
    .innerJoin('film', 'film.id', 'placement.film_id')
    .select((eb) => [
      'placement.id', 'placement.spot', 'placement.width_mm', 'placement.quantity', 'placement.spares', 'placement.spares_on_hand',
      'revision.number', 'robot.id as robot_id', 'robot.name as robot_name', 'robot.season', 'film.id as film_id', 'film.name as film_name',
      jsonArrayFrom(eb.selectFrom('job').select(['job.id', 'job.kind', 'job.state', 'job.quantity'])
        .whereRef('job.placement_id', '=', 'placement.id').orderBy('job.id')).as('jobs'),
    ])
    .where('revision.artwork_id', '=', artworkId)
    .where('placement.removed_at', 'is', null)
    .orderBy('robot.name').orderBy('placement.id')
    .execute()
}

/** The latest decision (approve or send back) on any of the artwork's revisions, with its comment. */
export function lastDecision(db: Db, artworkId: number) {
  return db.selectFrom('review_event')
    .innerJoin('revision', 'revision.id', 'review_event.revision_id')
    .innerJoin('users', 'users.id', 'review_event.actor_id')
    .select(['review_event.action', 'review_event.comment', 'review_event.at', 'revision.number', 'users.name'])
    .where('revision.artwork_id', '=', artworkId).where('review_event.action', 'in', ['approve', 'send-back'])
    .orderBy('review_event.id', 'desc').limit(1)
    .executeTakeFirst()
}
