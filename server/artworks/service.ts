// Artworks and their revisions: upload, list, read, and new revisions from new settings.
import { sql, type Transaction } from 'kysely'
import { z } from 'zod'
import type { Database } from '../db/schema'
import type { ArtworkDetail, ArtworkListItem, ArtworkPage, CreatedArtwork, RevisionDetail, RevisionSummary } from '#shared/types/artworks'
import { parseSettings, type PipelineSettings } from '#shared/utils/settings'
import { decodeCursor, encodeCursor } from '../platform/cursor'
import { inTransaction, type Db } from '../platform/db'
import { invalidInput } from '../platform/http'
import { contentHash, getObject } from '../platform/object-store'
import { flags, type Actor, type TeamSubject } from '../policy'
import { audit } from '../history/service'
import { addWork, finishWork, reportPhase, type BegunWork } from '../work/items'
import type { WorkResult } from '#shared/types/work'
import type { ColourSettings } from '#shared/utils/colour-settings'
import type { RevisionColour, RevisionLayerInfo } from '#shared/types/layers'
import { reviewHistory } from '../review/queries'
import { artworkCount, artworkPage, findArtwork, findRevision, lastDecision, latestSource, layersOf, placementsOfArtwork, revisionsOf, type ArtworkFilter, type ArtworkRow, type RevisionRow } from './queries'
import { abandonClaim, claimAndStore, settleClaim, type ObjectToStore } from './objects'
import { inspectSource } from './sources'
import { insertLayers, layeredTimings, layerObjects, runRevisionWork, totalMeasurements, type LayerFiles, type MadeRevision } from './layers'

// ---------- reading ----------

function toListItem(r: ArtworkRow): ArtworkListItem {
  return {
    id: r.id, title: r.title, status: r.status,
    team: { id: r.teamId, name: r.team_name, colour: r.team_colour },
    author: r.author_name,
    latestRevision: r.latest ? { id: r.latest.id, number: r.latest.number, status: r.latest.status } : null,
    revisionCount: r.revision_count ?? 0,
    updatedAt: new Date(r.updated_at).toISOString(),
  }
}

const listCursor = z.object({ at: z.string().max(64), id: z.number().int().positive() })

/** The artworks the actor may see, most recently changed first, a page at a time. */
export async function listArtworks(db: Db, actor: Actor, o: ArtworkFilter & { cursor?: string; limit: number }): Promise<ArtworkPage> {
  const after = decodeCursor(o.cursor, listCursor)
  const [rows, total] = await Promise.all([artworkPage(db, actor, o, after, o.limit + 1), artworkCount(db, actor, o)])
  const more = rows.length > o.limit
  const shown = more ? rows.slice(0, o.limit) : rows
  const last = shown[shown.length - 1]
  return { items: shown.map(toListItem), total, nextCursor: more && last ? encodeCursor({ at: last.order_at, id: last.id }) : null }
}

type LayerRows = Awaited<ReturnType<typeof layersOf>>

/** A layered revision's layers as answered, with the addresses of their files. */
function layerInfo(revisionId: number, rows: LayerRows): RevisionLayerInfo[] {
  return rows.filter((l) => l.revision_id === revisionId).map((l) => {
    const base = `/api/revisions/${revisionId}/layers/${l.position}`
    return {
      position: l.position, name: l.name, hex: l.hex, measurements: l.measurements,
      files: { vector: `${base}/vector.svg`, prepared: l.prepared_key ? `${base}/prepared.png` : null, outline: l.outline_key ? `${base}/outline.svg` : null },
    }
  })
}

function revisionSummary(r: { id: number; number: number; width_mm: number; height_mm: number; drawing_width_mm: number | null; created_at: Date; author_name: string; status: RevisionSummary['status']; measurements: RevisionSummary['measurements']; layer_count: number; colour: RevisionColour | null }, layers: LayerRows): RevisionSummary {
  return {
    id: r.id, number: r.number, status: r.status, widthMm: r.width_mm, heightMm: r.height_mm,
    // Before the decal was trimmed to the drawing, the width asked for was the whole picture's.
    drawingWidthMm: r.drawing_width_mm ?? r.width_mm,
    createdAt: new Date(r.created_at).toISOString(), author: r.author_name, measurements: r.measurements,
    layerCount: r.layer_count, layers: layerInfo(r.id, layers), colour: r.colour,
  }
}

/** The artwork's page. The caller has found it in the actor's scope. */
export async function artworkDetail(db: Db, actor: Actor, row: ArtworkRow): Promise<ArtworkDetail> {
  const [revisions, placed, decision] = await Promise.all([revisionsOf(db, row.id), placementsOfArtwork(db, row.id), lastDecision(db, row.id)])
  const layers = await layersOf(db, revisions.filter((r) => r.layer_count > 1).map((r) => r.id))
  return {
    artwork: { ...toListItem(row), createdAt: new Date(row.created_at).toISOString() },
    revisions: revisions.map((r) => revisionSummary(r, layers)),
    placements: placed.map((p) => ({
      id: p.id, spot: p.spot, widthMm: p.width_mm, quantity: p.quantity, spares: p.spares, sparesOnHand: p.spares_on_hand, revisionNumber: p.number,
      robot: { id: p.robot_id, name: p.robot_name, season: p.season }, film: { id: p.film_id, name: p.film_name }, jobs: p.jobs,
    })),
    lastDecision: decision
      ? { decision: decision.action === 'approve' ? 'approve' : 'send-back', comment: decision.comment, at: new Date(decision.at).toISOString(), by: decision.name, revisionNumber: decision.number }
      : null,
    can: flags(actor, ['artwork.revise', 'revision.submit', 'revision.review'], row),
  }
}

export async function revisionDetail(db: Db, row: RevisionRow): Promise<RevisionDetail> {
  const base = `/api/revisions/${row.id}`
  const [reviews, layers] = await Promise.all([reviewHistory(db, row.id), row.layer_count > 1 ? layersOf(db, [row.id]) : []])
  return {
    reviews,
    ...revisionSummary(row, layers),
    artworkId: row.artwork_id,
    settings: row.settings as unknown as Record<string, unknown>,
    choices: row.choices,
    timings: row.timings,
    engineVersions: row.engine_versions,
    origin: row.origin,
    plate: row.plate,
    source: row.source_id === null ? null : { id: row.source_id, mediaType: row.media_type!, fileName: row.file_name!, widthPx: row.width_px!, heightPx: row.height_px!, bytes: row.bytes!, contentHash: row.content_hash! },
    files: row.origin === 'generated'
      ? { vector: `${base}/vector.svg`, prepared: null, outline: null, source: null }
      : { vector: `${base}/vector.svg`, prepared: `${base}/prepared.png`, outline: `${base}/outline.svg`, source: `${base}/source` },
  }
}

// ---------- writing ----------

interface StoredFiles { prepared: string; outline: string; vector: string; layers: LayerFiles[] }

/**
 * The result's files under content-addressed keys: the same bytes are stored once and a stored
 * file never changes. A layered revision's prepared bitmap and raw outline are the drawing's
 * ink as one colour; its clean vector is the stacked layers; each layer has files of its own.
 */
function resultObjects(made: MadeRevision): { files: StoredFiles; objects: ObjectToStore[] } {
  const result = made.single
  const enc = new TextEncoder()
  const stored = (name: 'prepared' | 'outline' | 'vector', bytes: Uint8Array, type: string): ObjectToStore =>
    ({ key: `${name}/${contentHash(bytes)}.${type === 'image/png' ? 'png' : 'svg'}`, bytes, type })
  const prepared = stored('prepared', result.preparedPng, 'image/png')
  const outline = stored('outline', enc.encode(result.rawOutlineSvg), 'image/svg+xml')
  if (made.layered) {
    const l = layerObjects(made.layered.result)
    return { files: { prepared: prepared.key, outline: outline.key, vector: l.stacked, layers: l.layers }, objects: [prepared, outline, ...l.objects] }
  }
  const vector = stored('vector', enc.encode(result.cleanSvg), 'image/svg+xml')
  return { files: { prepared: prepared.key, outline: outline.key, vector: vector.key, layers: [] }, objects: [prepared, outline, vector] }
}

async function insertRevision(trx: Transaction<Database>, o: { artworkId: number; sourceId: number; settings: PipelineSettings; drawingWidthMm: number; made: MadeRevision; files: StoredFiles; authorId: number }) {
  // Lock the artwork so two saves at once get consecutive numbers.
  await trx.selectFrom('artwork').select('id').where('id', '=', o.artworkId).forUpdate().executeTakeFirstOrThrow()
  const { next } = await trx.selectFrom('revision').select(sql<number>`coalesce(max(number), 0)::int + 1`.as('next'))
    .where('artwork_id', '=', o.artworkId).executeTakeFirstOrThrow()
  const { single, layered } = o.made
  const m = layered ? totalMeasurements(layered.result.layers, layered.result.frame, single.measurements.threshold) : single.measurements
  const rev = await trx.insertInto('revision').values({
    artwork_id: o.artworkId, number: next, source_id: o.sourceId,
    settings: JSON.stringify(o.settings), width_mm: m.widthMm, height_mm: m.heightMm, drawing_width_mm: o.drawingWidthMm,
    prepared_key: o.files.prepared, outline_key: o.files.outline, vector_key: o.files.vector,
    measurements: JSON.stringify(m), timings: JSON.stringify(layered ? layeredTimings(layered.result) : single.timings),
    engine_versions: JSON.stringify(layered ? layered.result.engineVersions : single.engineVersions), choices: JSON.stringify(single.choices), author_id: o.authorId,
    ...(layered ? { layer_count: layered.result.layers.length, colour: JSON.stringify(layered.colour) } : {}),
  }).returning(['id', 'number']).executeTakeFirstOrThrow()
  if (layered) await insertLayers(trx, rev.id, layered.result, o.files.layers)
  await trx.updateTable('artwork').set({ updated_at: new Date() }).where('id', '=', o.artworkId).execute()
  return rev
}

export interface NewArtwork {
  title: string
  widthMm: number
  fileName: string
  bytes: Uint8Array
  /** SHA-256 of the bytes when the caller has it already (the upload hashes while it reads). */
  contentHash?: string
}

/** Who asked for a piece of work, as the rows and the history record them. */
interface WorkAuthor { id: number; programId: number; ip: string | null }
const authorOf = (actor: Actor): WorkAuthor => ({ id: actor.id, programId: actor.programId, ip: actor.ip })
const historyBy = (a: WorkAuthor) => ({ programId: a.programId, actorId: a.id, ip: a.ip })

/** What a queued upload carries to the runner. */
interface UploadInput {
  teamId: number
  title: string
  widthMm: number
  fileName: string
  author: WorkAuthor
  sourceKey: string
  contentHash: string
  mediaType: string
  extension: string
  widthPx: number
  heightPx: number
  bytes: number
}

/**
 * Asks for a new artwork from an uploaded picture, with revision 1 at default settings: the
 * picture is stored (under a claim), then the work item and its job are added in the
 * transaction that settles the claim. Returns the work item's id. The caller has checked
 * `artwork.upload` in the team.
 */
export async function requestArtwork(db: Db, actor: Actor, team: TeamSubject, input: NewArtwork): Promise<number> {
  // A file that is not a picture is refused before anything is stored.
  const facts = await inspectSource(input.bytes)
  const hash = input.contentHash ?? contentHash(input.bytes)
  const work: UploadInput = {
    teamId: team.teamId, title: input.title, widthMm: input.widthMm, author: authorOf(actor),
    fileName: input.fileName.slice(0, 200) || `source.${facts.extension}`,
    sourceKey: `sources/${hash}`, contentHash: hash, mediaType: facts.mediaType, extension: facts.extension,
    widthPx: facts.widthPx, heightPx: facts.heightPx, bytes: input.bytes.byteLength,
  }
  // Stored files are claimed while this request uses them (./objects.ts); the work item then holds the source.
  const claim = await claimAndStore(db, [{ key: work.sourceKey, bytes: input.bytes, type: facts.mediaType }])
  try {
    return await inTransaction(db, async (trx) => {
      const id = await addWork(trx, { programId: actor.programId, kind: 'upload', askedBy: actor.id, input: { ...work }, sourceKey: work.sourceKey })
      await settleClaim(trx, claim)
      return id
    })
  } catch (err) {
    await abandonClaim(db, claim)
    throw err
  }
}

/** The runner's half of an upload: the outline, its files and the rows, in one transaction with the item's outcome. */
async function makeFirstRevision(db: Db, item: BegunWork, input: UploadInput): Promise<WorkResult> {
  const settings = parseSettings({})
  const source = await getObject(input.sourceKey)
  await reportPhase(db, item.id, 'outlining')
  const made = await runRevisionWork({ source, settings, widthMm: input.widthMm })
  return saveRevision(db, item, made, async (trx) => {
    const artwork = await trx.insertInto('artwork').values({ team_id: input.teamId, title: input.title, author_id: input.author.id })
      .returning('id').executeTakeFirstOrThrow()
    const row = await trx.insertInto('source').values({
      artwork_id: artwork.id, object_key: input.sourceKey, content_hash: input.contentHash, media_type: input.mediaType,
      file_name: input.fileName, width_px: input.widthPx, height_px: input.heightPx, bytes: input.bytes, uploaded_by: input.author.id,
    }).returning('id').executeTakeFirstOrThrow()
    const rev = await insertRevision(trx, { artworkId: artwork.id, sourceId: row.id, settings, drawingWidthMm: input.widthMm, made, files: resultObjects(made).files, authorId: input.author.id })
    await audit(trx, { ...historyBy(input.author), action: 'upload', subject: 'artwork', subjectId: artwork.id, detail: { title: input.title, revision: rev.number, fileName: input.fileName } })
    return { artworkId: artwork.id, revisionId: rev.id }
  })
}

/** Stores the result's files under a claim, then writes the rows and the item's outcome in one transaction. */
async function saveRevision(db: Db, item: BegunWork, made: MadeRevision, write: (trx: Transaction<Database>) => Promise<WorkResult>): Promise<WorkResult> {
  await reportPhase(db, item.id, 'storing')
  const claim = await claimAndStore(db, resultObjects(made).objects)
  try {
    await reportPhase(db, item.id, 'saving')
    return await inTransaction(db, async (trx) => {
      const done = await write(trx)
      await settleClaim(trx, claim)
      await finishWork(trx, item.id, done)
      return done
    })
  } catch (err) {
    await abandonClaim(db, claim)
    throw err
  }
}

/** The answer to an upload once its work is done: the same as the upload route has always given. */
export async function createdArtwork(db: Db, actor: Actor, done: WorkResult): Promise<CreatedArtwork> {
  const [artwork, revision] = await Promise.all([findArtwork(db, actor, done.artworkId), findRevision(db, actor, done.revisionId)])
  return { artwork: toListItem(artwork!), revision: await revisionDetail(db, revision!) }
}

/** The answer to a revision request once its work is done. */
export async function createdRevision(db: Db, actor: Actor, done: WorkResult): Promise<RevisionDetail> {
  return revisionDetail(db, (await findRevision(db, actor, done.revisionId))!)
}

export function parseSettingsOr400(input: unknown): PipelineSettings {
  try {
    return parseSettings(input)
  } catch (err) {
    if (err instanceof z.ZodError) throw invalidInput(err)
    throw err
  }
}

interface RevisionInput { artworkId: number; title: string; sourceId: number; sourceKey: string; settings: PipelineSettings; widthMm: number; colour?: ColourSettings; author: WorkAuthor }

/** Asks for a new revision from new settings and size; returns the work item's id. The caller has checked `artwork.revise` on the artwork. */
export async function requestRevision(db: Db, actor: Actor, artwork: ArtworkRow, input: { settings: unknown; widthMm: number; colour?: ColourSettings }): Promise<number> {
  const settings = parseSettingsOr400(input.settings)
  const source = await latestSource(db, artwork.id)
  const work: RevisionInput = { artworkId: artwork.id, title: artwork.title, sourceId: source.id, sourceKey: source.object_key, settings, widthMm: input.widthMm, ...(input.colour ? { colour: input.colour } : {}), author: authorOf(actor) }
  return inTransaction(db, (trx) => addWork(trx, { programId: actor.programId, kind: 'revise', askedBy: actor.id, input: { ...work } }))
}

/** The runner's half of a revision. */
async function makeLaterRevision(db: Db, item: BegunWork, input: RevisionInput): Promise<WorkResult> {
  const source = await getObject(input.sourceKey)
  await reportPhase(db, item.id, 'outlining')
  const made = await runRevisionWork({ source, settings: input.settings, widthMm: input.widthMm, colour: input.colour })
  return saveRevision(db, item, made, async (trx) => {
    const r = await insertRevision(trx, { artworkId: input.artworkId, sourceId: input.sourceId, settings: input.settings, drawingWidthMm: input.widthMm, made, files: resultObjects(made).files, authorId: input.author.id })
    await audit(trx, { ...historyBy(input.author), action: 'revise', subject: 'artwork', subjectId: input.artworkId, detail: { title: input.title, revision: r.number } })
    return { artworkId: input.artworkId, revisionId: r.id }
  })
}

/** Makes the revision a work item asks for (the queue's make-revision task). */
export function makeRevision(db: Db, item: BegunWork): Promise<WorkResult> {
  return item.kind === 'upload'
    ? makeFirstRevision(db, item, item.input as UploadInput)
    : makeLaterRevision(db, item, item.input as RevisionInput)
}
