import type { H3Event } from 'h3'
import { sql, type Transaction } from 'kysely'
import type { Database } from '../db/schema'
import type { ArtworkDetail, ArtworkListItem, ArtworkPage, CreatedArtwork, RevisionDetail, RevisionSummary } from '#shared/types/artworks'
import { parseSettings, type PipelineSettings } from '#shared/utils/settings'
import type { RunResult } from '../pipeline/run'
import type { Actor } from './actor'

// ---------- reading ----------

function visibleArtworks(actor: Actor) {
  let q = useDb().selectFrom('artwork')
    .innerJoin('team', 'team.id', 'artwork.team_id')
    .innerJoin('users as author', 'author.id', 'artwork.author_id')
    .where('team.program_id', '=', actor.programId)
  // Another team's things do not exist for a member; a mentor sees the whole program.
  if (!actor.isMentor) q = q.where('artwork.team_id', 'in', [0, ...actor.memberships.keys()])
  return q
}

const listColumns = [
  'artwork.id', 'artwork.title', 'artwork.status', 'artwork.updated_at', 'artwork.created_at', 'artwork.team_id',
  'team.name as team_name', 'team.colour as team_colour', 'author.name as author_name',
] as const

async function withLatest(rows: { id: number; title: string; status: ArtworkListItem['status']; updated_at: Date; team_id: number; team_name: string; team_colour: string; author_name: string }[]): Promise<ArtworkListItem[]> {
  if (!rows.length) return []
  const latest = await useDb().selectFrom('revision')
    .select(['artwork_id', sql<number>`max(number)::int`.as('number'), sql<number>`count(*)::int`.as('count')])
    .where('artwork_id', 'in', rows.map((r) => r.id)).groupBy('artwork_id').execute()
  const ids = latest.length
    ? await useDb().selectFrom('revision').select(['id', 'artwork_id', 'number'])
      .where((eb) => eb.or(latest.map((l) => eb.and([eb('artwork_id', '=', l.artwork_id), eb('number', '=', l.number)])))).execute()
    : []
  return rows.map((r) => {
    const l = latest.find((x) => x.artwork_id === r.id)
    const rev = ids.find((x) => x.artwork_id === r.id)
    return {
      id: r.id, title: r.title, status: r.status,
      team: { id: r.team_id, name: r.team_name, colour: r.team_colour },
      author: r.author_name,
      latestRevision: rev ? { id: rev.id, number: rev.number } : null,
      revisionCount: l?.count ?? 0,
      updatedAt: new Date(r.updated_at).toISOString(),
    }
  })
}

export async function listArtworks(actor: Actor, o: { teamId?: number; q?: string; page: number; pageSize: number }): Promise<ArtworkPage> {
  let q = visibleArtworks(actor)
  if (o.teamId) q = q.where('artwork.team_id', '=', o.teamId)
  if (o.q) q = q.where('artwork.title', 'ilike', `%${o.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`)
  const [{ total }, rows] = await Promise.all([
    q.select(sql<number>`count(*)::int`.as('total')).executeTakeFirstOrThrow(),
    q.select([...listColumns]).orderBy('artwork.updated_at', 'desc').orderBy('artwork.id', 'desc')
      .limit(o.pageSize).offset((o.page - 1) * o.pageSize).execute(),
  ])
  return { items: await withLatest(rows), total, page: o.page, pageSize: o.pageSize }
}

/** The artwork if the actor may see it; 404 otherwise (another team's artwork does not exist for them). */
export async function findArtwork(actor: Actor, id: number) {
  const row = await visibleArtworks(actor).select([...listColumns]).where('artwork.id', '=', id).executeTakeFirst()
  if (!row) throw createError({ statusCode: 404, message: 'No such artwork.' })
  return row
}

function revisionSummary(r: { id: number; number: number; width_mm: number; height_mm: number; created_at: Date; author_name: string; status: RevisionSummary['status']; measurements: RevisionSummary['measurements'] }): RevisionSummary {
  return { id: r.id, number: r.number, status: r.status, widthMm: r.width_mm, heightMm: r.height_mm, createdAt: new Date(r.created_at).toISOString(), author: r.author_name, measurements: r.measurements }
}

export async function artworkDetail(actor: Actor, id: number): Promise<ArtworkDetail> {
  const row = await findArtwork(actor, id)
  const [item] = await withLatest([row])
  const revisions = await useDb().selectFrom('revision').innerJoin('users', 'users.id', 'revision.author_id')
    .innerJoin('revision_status', 'revision_status.revision_id', 'revision.id')
    .select(['revision.id', 'revision.number', 'revision.width_mm', 'revision.height_mm', 'revision.created_at', 'revision.measurements', 'users.name as author_name', 'revision_status.status'])
    .where('revision.artwork_id', '=', id).orderBy('revision.number', 'desc').execute()
  return {
    artwork: { ...item!, createdAt: new Date(row.created_at).toISOString() },
    revisions: revisions.map(revisionSummary),
    can: { revise: canActInTeam(actor, row.team_id, 'designer') },
  }
}

export async function findRevision(actor: Actor, revisionId: number) {
  const row = await useDb().selectFrom('revision')
    .innerJoin('artwork', 'artwork.id', 'revision.artwork_id')
    .innerJoin('team', 'team.id', 'artwork.team_id')
    .innerJoin('source', 'source.id', 'revision.source_id')
    .innerJoin('users', 'users.id', 'revision.author_id')
    .innerJoin('revision_status', 'revision_status.revision_id', 'revision.id')
    .selectAll('revision')
    .select(['revision_status.status', 'artwork.title', 'artwork.team_id', 'users.name as author_name',
      'source.object_key as source_key', 'source.media_type', 'source.file_name', 'source.width_px', 'source.height_px', 'source.bytes', 'source.content_hash'])
    .where('revision.id', '=', revisionId)
    .where('team.program_id', '=', actor.programId)
    .executeTakeFirst()
  if (!row || (!actor.isMentor && !actor.memberships.has(row.team_id))) throw createError({ statusCode: 404, message: 'No such revision.' })
  return row
}

export async function revisionDetail(row: Awaited<ReturnType<typeof findRevision>>): Promise<RevisionDetail> {
  const base = `/api/revisions/${row.id}`
  return {
    reviews: await reviewHistory(row.id),
    ...revisionSummary(row),
    artworkId: row.artwork_id,
    settings: row.settings as unknown as Record<string, unknown>,
    timings: row.timings,
    engineVersions: row.engine_versions,
    source: { id: row.source_id, mediaType: row.media_type, fileName: row.file_name, widthPx: row.width_px, heightPx: row.height_px, bytes: row.bytes, contentHash: row.content_hash },
    files: { vector: `${base}/vector.svg`, prepared: `${base}/prepared.png`, outline: `${base}/outline.svg`, source: `${base}/source` },
  }
}

// ---------- writing ----------

interface StoredFiles { prepared: string; outline: string; vector: string }

/** Content-addressed keys: the same bytes are stored once and a stored file never changes. */
async function storeResult(result: RunResult, created: string[]): Promise<StoredFiles> {
  const enc = new TextEncoder()
  const files: [string, Uint8Array, string][] = [
    ['prepared', result.preparedPng, 'image/png'],
    ['outline', enc.encode(result.rawOutlineSvg), 'image/svg+xml'],
    ['vector', enc.encode(result.cleanSvg), 'image/svg+xml'],
  ]
  const keys: Record<string, string> = {}
  for (const [name, bytes, type] of files) {
    const key = `${name}/${contentHash(bytes)}.${type === 'image/png' ? 'png' : 'svg'}`
    if (!(await objectExists(key))) {
      await putObject(key, bytes, type)
      created.push(key)
    }
    keys[name] = key
  }
  return keys as unknown as StoredFiles
}

/** After a failure: remove the objects this request wrote that no row points at. */
async function removeOrphans(keys: string[]): Promise<void> {
  for (const key of keys) {
    const db = useDb()
    const used = await db.selectFrom('revision').select('id')
      .where((eb) => eb.or([eb('prepared_key', '=', key), eb('outline_key', '=', key), eb('vector_key', '=', key)])).limit(1).executeTakeFirst()
      ?? await db.selectFrom('source').select('id').where('object_key', '=', key).limit(1).executeTakeFirst()
    if (!used) await deleteObject(key).catch((err) => console.error('[decalwright] could not remove', key, err))
  }
}

async function insertRevision(trx: Transaction<Database>, o: { artworkId: number; sourceId: number; settings: PipelineSettings; result: RunResult; files: StoredFiles; authorId: number }) {
  // Lock the artwork so two saves at once get consecutive numbers.
  await trx.selectFrom('artwork').select('id').where('id', '=', o.artworkId).forUpdate().executeTakeFirstOrThrow()
  const { next } = await trx.selectFrom('revision').select(sql<number>`coalesce(max(number), 0)::int + 1`.as('next'))
    .where('artwork_id', '=', o.artworkId).executeTakeFirstOrThrow()
  const m = o.result.measurements
  const rev = await trx.insertInto('revision').values({
    artwork_id: o.artworkId, number: next, source_id: o.sourceId,
    settings: JSON.stringify(o.settings), width_mm: m.widthMm, height_mm: m.heightMm,
    prepared_key: o.files.prepared, outline_key: o.files.outline, vector_key: o.files.vector,
    measurements: JSON.stringify(m), timings: JSON.stringify(o.result.timings),
    engine_versions: JSON.stringify(o.result.engineVersions), author_id: o.authorId,
  }).returning(['id', 'number']).executeTakeFirstOrThrow()
  await trx.updateTable('artwork').set({ updated_at: new Date() }).where('id', '=', o.artworkId).execute()
  return rev
}

export async function createArtwork(event: H3Event, actor: Actor, input: {
  title: string; teamId: number; widthMm: number; fileName: string; bytes: Uint8Array
}): Promise<CreatedArtwork> {
  const facts = await inspectSource(input.bytes)
  const settings = parseSettings({})
  // The outline first: a file that cannot be traced leaves nothing behind.
  const result = await runInPool({ source: input.bytes, settings, widthMm: input.widthMm, purpose: 'revision' })
  const hash = contentHash(input.bytes)
  const sourceKey = `sources/${hash}`
  const created: string[] = []
  try {
    if (!(await objectExists(sourceKey))) {
      await putObject(sourceKey, input.bytes, facts.mediaType)
      created.push(sourceKey)
    }
    const files = await storeResult(result, created)
    const ids = await useDb().transaction().execute(async (trx) => {
      const artwork = await trx.insertInto('artwork').values({ team_id: input.teamId, title: input.title, author_id: actor.id })
        .returning('id').executeTakeFirstOrThrow()
      const source = await trx.insertInto('source').values({
        artwork_id: artwork.id, object_key: sourceKey, content_hash: hash, media_type: facts.mediaType,
        file_name: input.fileName.slice(0, 200) || `source.${facts.extension}`, width_px: facts.widthPx, height_px: facts.heightPx,
        bytes: input.bytes.byteLength, uploaded_by: actor.id,
      }).returning('id').executeTakeFirstOrThrow()
      const rev = await insertRevision(trx, { artworkId: artwork.id, sourceId: source.id, settings, result, files, authorId: actor.id })
      await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'upload', subjectType: 'artwork', subjectId: artwork.id, detail: { title: input.title, revision: rev.number, fileName: input.fileName } })
      return { artworkId: artwork.id, revisionId: rev.id }
    })
    const [artwork] = await withLatest([await findArtwork(actor, ids.artworkId)])
    return { artwork: artwork!, revision: await revisionDetail(await findRevision(actor, ids.revisionId)) }
  } catch (err) {
    await removeOrphans(created)
    throw err
  }
}

export async function createRevision(event: H3Event, actor: Actor, artworkId: number, input: { settings: unknown; widthMm: number }): Promise<RevisionDetail> {
  const artwork = await findArtwork(actor, artworkId)
  if (!canActInTeam(actor, artwork.team_id, 'designer')) throw createError({ statusCode: 403, message: 'Only a designer or a mentor may make a new revision.' })
  const settings = parseSettingsOr400(input.settings)
  const source = await latestSource(artworkId)
  const bytes = await getObject(source.object_key)
  const result = await runInPool({ source: bytes, settings, widthMm: input.widthMm, purpose: 'revision' })
  const created: string[] = []
  try {
    const files = await storeResult(result, created)
    const rev = await useDb().transaction().execute(async (trx) => {
      const r = await insertRevision(trx, { artworkId, sourceId: source.id, settings, result, files, authorId: actor.id })
      await audit(trx, event, { programId: actor.programId, actorId: actor.id, action: 'revise', subjectType: 'artwork', subjectId: artworkId, detail: { title: artwork.title, revision: r.number } })
      return r
    })
    return revisionDetail(await findRevision(actor, rev.id))
  } catch (err) {
    await removeOrphans(created)
    throw err
  }
}

export async function latestSource(artworkId: number) {
  return useDb().selectFrom('source').selectAll().where('artwork_id', '=', artworkId).orderBy('id', 'desc').limit(1).executeTakeFirstOrThrow()
}

export function parseSettingsOr400(input: unknown): PipelineSettings {
  try {
    return parseSettings(input)
  } catch (err) {
    throw invalidInput(err as never)
  }
}
