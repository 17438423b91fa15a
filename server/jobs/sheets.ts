// The cut sheets of one job or of a batch: the copies of every job packed on the film's sheets,
// kerf-compensated by the film's kerf, labelled, with weeding lines when asked for. Built as a
// work item (the queue's build-cut-sheet task) in a worker thread, which reads the stored
// vectors itself, when first asked for, and kept in object storage under a key made of everything
// that shapes the files (the jobs' drawings, sizes and counts, the sheet, the options and the
// engine's version), so a second download, or the other format, is read back, not rebuilt.
import { createHash } from 'node:crypto'
import { createError } from 'h3'
import type { z } from 'zod'
import type { JobLayout } from '#shared/types/robots'
import { DEFAULT_KERF_MM } from '#shared/films/library'
import type { cutSheetQuerySchema } from '#shared/utils/schemas'
import { CUT_SHEET_LIMITS, WEEDING_LINE_LIMITS } from '#shared/constants/cut-sheet'
import type { PackInput } from '../cutsheet/pack'
import type { BatchSheetInput } from '../cutsheet/sheet'
import { keepSheetsFromVectorsInPool, packInPool } from '../platform/cutsheet-pool'
import { keptSheetKey } from '../cutsheet/worker'
import { sql } from 'kysely'
import type { SheetWorkResult, WorkPhase } from '#shared/types/work'
import { inTransaction, type Db } from '../platform/db'
import type { Actor } from '../policy'
import { addWork, finishWork, reportPhase, type BegunWork } from '../work/items'
import { deleteObject, getObject, listObjects, objectExists, putObject, type StoredObject } from '../platform/object-store'

/** Bump when the files change for the same input, so kept sheets are built again. */
export const CUT_SHEET_ENGINE = 'sheets-2'
const PREFIX = 'cut-sheets/'

export type SheetOptions = Omit<z.output<typeof cutSheetQuerySchema>, 'sheet'>
export const DEFAULT_SHEET: SheetOptions = {
  mirror: false, frame: CUT_SHEET_LIMITS.frame.default, gap: CUT_SHEET_LIMITS.gap.default, margin: CUT_SHEET_LIMITS.margin.default,
  kerf: undefined, labels: 'text', weeding: false, clearance: WEEDING_LINE_LIMITS.clearance.default, spacing: WEEDING_LINE_LIMITS.spacing.default,
}

/** What a job brings to a sheet. */
export interface SheetJob {
  job_id: number
  job_quantity: number
  job_width: number
  revision_width: number
  revision_height: number
  vector_key: string
  sheet_width_mm: number
  sheet_height_mm: number
  film_kerf: number | null
}

/** The kerf the files compensate: the option when given (0: off), else the film's, else the common-practice default. */
export function kerfFor(jobs: SheetJob[], o: SheetOptions): number {
  return o.kerf ?? jobs[0]?.film_kerf ?? DEFAULT_KERF_MM
}

const copyHeight = (j: SheetJob) => (j.job_width * j.revision_height) / j.revision_width

/** Everything but the curves: enough to lay the sheets out, and the key's substance. */
function sheetInput(jobs: SheetJob[], o: SheetOptions): Omit<BatchSheetInput, 'designs'> & { designs: PackInput['designs'] } {
  const first = jobs[0]
  if (!first) throw createError({ statusCode: 409, message: 'There are no jobs to lay out.' })
  return {
    designs: jobs.map((j) => ({
      id: `J${j.job_id}`, widthMm: j.job_width, heightMm: copyHeight(j), count: j.job_quantity,
      labels: Array.from({ length: j.job_quantity }, (_, i) => `${j.job_id}-${i + 1}`),
    })),
    sheetWidthMm: first.sheet_width_mm, sheetHeightMm: first.sheet_height_mm, gapMm: o.gap, marginMm: o.margin,
    kerfMm: kerfFor(jobs, o), weedingFrameMm: o.frame > 0 ? o.frame : null, labels: { mode: o.labels }, mirror: o.mirror,
    weedingLines: o.weeding ? { spacingMm: o.spacing, clearanceMm: o.clearance } : null,
  }
}

/** How the copies go on the sheets (boxes only, in the pool: hundreds of copies take tens of milliseconds). */
export async function sheetLayout(jobs: SheetJob[], o: SheetOptions): Promise<JobLayout> {
  const p = await packInPool(sheetInput(jobs, o))
  return {
    fits: p.fits, reason: p.reason, method: p.method, sheets: p.sheets, usagePercent: p.usagePercent,
    perSheet: p.perSheet[0]?.copies ?? 0, turned: p.copies.some((c) => c.turned), kerfMm: kerfFor(jobs, o),
    copies: p.copies.map((c) => ({ label: c.label, jobId: Number(c.designId.slice(1)), sheet: c.sheet, turned: c.turned, box: c.box })),
  }
}

/** Sheets a cut uses unless the operator says otherwise: the default options' count. */
export async function defaultSheetCount(jobs: SheetJob[]): Promise<number> {
  return (await sheetLayout(jobs, DEFAULT_SHEET)).sheets
}

/** The content key: the same jobs' drawings, sizes, counts and sheet with the same options give the same files. */
export function sheetKey(jobs: SheetJob[], o: SheetOptions): string {
  const input = sheetInput(jobs, o)
  const substance = { engine: CUT_SHEET_ENGINE, input, vectors: jobs.map((j) => j.vector_key) }
  return createHash('sha256').update(JSON.stringify(substance)).digest('hex')
}

export interface SheetFile { bytes: Buffer; sheets: number; fromStore: boolean }

/** Whose sheets these are: a batch's (its jobs now), or a job's own. Kept with the files, so the sweep can tell whether they can still be asked for. */
export type SheetOwner = { batchId: number; jobIds?: undefined } | { batchId?: undefined; jobIds: number[] }

/** What is kept beside the files; written last, so a half-kept set is never read. */
interface SheetManifest { sheets: number; engine: string; owner?: SheetOwner; options?: SheetOptions; builtAt?: string }

const setPrefix = (key: string) => `${PREFIX}${key}/`
const fileKey = (key: string, n: number, format: 'svg' | 'dxf') => keptSheetKey(setPrefix(key), n, format)
const countKey = (key: string) => `${PREFIX}${key}/sheets.json`

async function readManifest(key: string): Promise<SheetManifest | null> {
  if (!(await objectExists(countKey(key)))) return null
  return JSON.parse((await getObject(countKey(key))).toString('utf8')) as SheetManifest
}

/** Builds every sheet in both formats off the request thread and keeps them; the manifest goes last. */
async function buildAndKeep(jobs: SheetJob[], o: SheetOptions, key: string, owner: SheetOwner, report: (p: WorkPhase) => Promise<void>): Promise<number> {
  const base = sheetInput(jobs, o)
  // The stored vectors go to the thread as they are: it reads and scales them, not this one.
  const vectors = await Promise.all(jobs.map((j) => getObject(j.vector_key)))
  await report('outlining')
  // The thread builds and stores the files; their bytes never come to this thread.
  const built = await keepSheetsFromVectorsInPool({ ...base, designs: base.designs.map(({ heightMm: _h, ...d }, i) => ({ ...d, vector: vectors[i]! })) }, setPrefix(key))
  // The files are kept by now; what is left is the manifest that makes the set readable.
  await report('storing')
  const manifest: SheetManifest = { sheets: built.sheets.length, engine: CUT_SHEET_ENGINE, owner, options: o, builtAt: new Date().toISOString() }
  await putObject(countKey(key), Buffer.from(JSON.stringify(manifest)), 'application/json')
  return built.sheets.length
}

/** Sheet `n` (from 1) of the set kept under `key`, or null when the set is not kept. */
async function keptFile(key: string, format: 'svg' | 'dxf', n: number): Promise<SheetFile | null> {
  const m = await readManifest(key)
  if (!m) return null
  if (n > m.sheets) throw createError({ statusCode: 404, message: `There ${m.sheets === 1 ? 'is 1 sheet' : `are ${m.sheets} sheets`}.` })
  return { bytes: await getObject(fileKey(key, n, format)), sheets: m.sheets, fromStore: true }
}

/** The queue's task that builds a set of cut sheets. */
export const BUILD_CUT_SHEET = 'build-cut-sheet'

/** What a cut-sheet work item asks for: the owner's sheets with these options (built from the jobs as they are when it runs). */
interface SheetWorkInput { key: string; owner: SheetOwner; options: SheetOptions }

/** A kept sheet, or the work item that is building its set. */
export type SheetAnswer = { file: SheetFile; workItemId?: undefined } | { file?: undefined; workItemId: number }

/**
 * Sheet `n` in `format` at once when its set is kept; otherwise the work item that builds the
 * set: the asker's own unfinished one for the same content, or a new one in the work queue.
 * Nothing is packed or written on the request thread.
 */
export async function keptOrQueued(db: Db, asker: Pick<Actor, 'id' | 'programId'>, jobs: SheetJob[], o: SheetOptions, format: 'svg' | 'dxf', n: number, owner: SheetOwner): Promise<SheetAnswer> {
  const key = sheetKey(jobs, o)
  const file = await keptFile(key, format, n)
  if (file) return { file }
  const open = await db.selectFrom('work_item').select('id')
    .where('kind', '=', 'cut-sheet').where('asked_by', '=', asker.id).where('state', 'in', ['queued', 'running'])
    .where(sql<string>`input->>'key'`, '=', key).orderBy('id', 'desc').executeTakeFirst()
  if (open) return { workItemId: open.id }
  const input: SheetWorkInput = { key, owner, options: o }
  const id = await inTransaction(db, (trx) => addWork(trx, { programId: asker.programId, kind: 'cut-sheet', askedBy: asker.id, input: { ...input }, task: BUILD_CUT_SHEET }))
  return { workItemId: id }
}

/**
 * The runner's half (the build-cut-sheet task): builds and keeps the owner's sheets as its jobs
 * are now, unless they are kept already, and finishes the item with the set's key and size.
 */
export async function buildSheetsForWork(db: Db, item: BegunWork): Promise<SheetWorkResult> {
  const { owner, options } = item.input as SheetWorkInput
  const jobs = await ownerJobs(db, owner)
  if (jobs.some((j) => !j.film_cleared)) throw createError({ statusCode: 422, message: 'This film may not be cut. See the film\'s page.' })
  const key = sheetKey(jobs, options)
  const sheets = (await readManifest(key))?.sheets ?? await buildAndKeep(jobs, options, key, owner, (p) => reportPhase(db, item.id, p))
  const result: SheetWorkResult = { sheetKey: key, sheets }
  await inTransaction(db, (trx) => finishWork(trx, item.id, result))
  return result
}

// ---------- the sweep ----------

/** Kept sheets no one has had built again for this long are removed; asking for them again builds them anew. */
export const KEPT_SHEET_MAX_AGE_S = 14 * 24 * 3600
/** A set with no manifest this old was left half-built by a process that died. */
export const HALF_BUILT_AGE_S = 3600

/** The owner's jobs as they are now, whoever asks (the sweep and the work queue have no person). */
export function ownerJobs(db: Db, owner: SheetOwner) {
  const q = db.selectFrom('job')
    .innerJoin('placement', 'placement.id', 'job.placement_id')
    .innerJoin('revision', 'revision.id', 'placement.revision_id')
    .innerJoin('film', 'film.id', 'job.film_id')
    // A layer's job cuts that layer's vector, as the job's page lays it out (jobs/queries.ts).
    .leftJoin('revision_layer as cut_layer', (j) => j.onRef('cut_layer.revision_id', '=', 'revision.id').onRef('cut_layer.position', '=', 'job.layer'))
    .select(['job.id as job_id', 'job.quantity as job_quantity', 'job.width_mm as job_width', 'revision.width_mm as revision_width', 'revision.height_mm as revision_height',
      sql<string>`coalesce(cut_layer.vector_key, revision.vector_key)`.as('vector_key'), 'film.sheet_width_mm', 'film.sheet_height_mm', 'film.kerf_mm as film_kerf', 'film.cleared as film_cleared', 'job.state'])
  return (owner.batchId !== undefined ? q.where('job.batch_id', '=', owner.batchId) : q.where('job.id', 'in', owner.jobIds.length ? owner.jobIds : [-1]))
    .orderBy('job.id').execute()
}

/** Whether the set under `key` is still what its owner's queued jobs would be built into with its options. */
async function stillAskedFor(db: Db, key: string, m: SheetManifest): Promise<boolean> {
  if (m.engine !== CUT_SHEET_ENGINE || !m.owner || !m.options) return false
  const jobs = await ownerJobs(db, m.owner)
  // A cut, cancelled or failed job, or a batch cut or emptied, is not cut from these sheets again.
  if (jobs.length === 0 || jobs.some((j) => j.state !== 'queued')) return false
  return sheetKey(jobs, m.options) === key
}

/**
 * Removes kept cut sheets nothing can ask for any more: their jobs changed (another quantity,
 * width, revision, film or batch gives another key), were cut, cancelled or failed; built with
 * another engine; older than `maxAgeS`; or left half-built. Returns how many sets were removed.
 */
export async function sweepKeptSheets(db: Db, o: { maxAgeS?: number; halfBuiltAgeS?: number; now?: Date } = {}): Promise<number> {
  const now = (o.now ?? new Date()).getTime()
  const sets = new Map<string, StoredObject[]>()
  let token: string | undefined
  do {
    const page = await listObjects(PREFIX, token)
    token = page.next
    for (const x of page.objects) {
      const key = x.key.slice(PREFIX.length).split('/')[0]!
      sets.set(key, [...(sets.get(key) ?? []), x])
    }
  } while (token)
  let removed = 0
  for (const [key, objects] of sets) {
    const manifest = objects.find((x) => x.key === countKey(key))
    const newest = Math.max(...objects.map((x) => x.lastModified.getTime()))
    let gone: boolean
    if (!manifest) gone = now - newest > (o.halfBuiltAgeS ?? HALF_BUILT_AGE_S) * 1000
    else if (now - manifest.lastModified.getTime() > (o.maxAgeS ?? KEPT_SHEET_MAX_AGE_S) * 1000) gone = true
    else gone = !(await stillAskedFor(db, key, JSON.parse((await getObject(manifest.key)).toString('utf8')) as SheetManifest))
    if (!gone) continue
    // The manifest first: from then on the set reads as not kept, and a request builds it again.
    for (const x of [...objects].sort((a, b) => Number(b.key === countKey(key)) - Number(a.key === countKey(key)))) await deleteObject(x.key)
    removed++
  }
  return removed
}
