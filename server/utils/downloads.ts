// Files sent to the browser: stored revision files and cut sheets, with recognisable names
// and headers that keep an SVG opened on its own from running anything.
import { createError, getQuery, setResponseHeaders, type H3Event } from 'h3'
import { extensionFor } from '#shared/constants/uploads'
import { fileSlug } from '../platform/file-names'
import { getObject } from '../platform/object-store'
import type { RevisionLayerRow, RevisionRow } from '../artworks/queries'

const SANDBOX = "default-src 'none'; style-src 'unsafe-inline'; sandbox"

export type RevisionFile = 'vector' | 'prepared' | 'outline' | 'source'

/** One stored file of a revision with its content type and a file name people can recognise. */
export async function sendRevisionFile(event: H3Event, row: RevisionRow, kind: RevisionFile, layer?: RevisionLayerRow): Promise<Buffer> {
  // One layer of a layered revision: its own files, named by position and ink.
  const keys = layer ?? row
  const base = layer ? layerFileBase(row.title, row.number, layer) : `${fileSlug(row.title, 60, 'artwork')}-r${row.number}`
  const file = {
    vector: { key: keys.vector_key, type: 'image/svg+xml', name: `${base}.svg` },
    outline: { key: keys.outline_key, type: 'image/svg+xml', name: `${base}-outline-px.svg` },
    prepared: { key: keys.prepared_key, type: 'image/png', name: `${base}-prepared.png` },
    source: { key: row.source_key, type: row.media_type ?? 'application/octet-stream', name: `${base}-source.${row.media_type ? extensionFor(row.media_type) : 'bin'}` },
  }[kind]
  if (!file.key) throw createError({ statusCode: 404, message: 'A generated plate has only its vector: no source, prepared bitmap or raw outline.' })
  return sendStoredFile(event, { ...file, key: file.key })
}

/** The name a layer's files carry: the artwork, the revision, the layer's place and ink. */
export function layerFileBase(title: string, number: number, layer: Pick<RevisionLayerRow, 'position' | 'name'>): string {
  return `${fileSlug(title, 60, 'artwork')}-r${number}-layer${layer.position + 1}-${fileSlug(layer.name, 30, 'ink')}`
}

/** A stored, content-addressed file, inline unless ?download is asked. */
export async function sendStoredFile(event: H3Event, file: { key: string; type: string; name: string }): Promise<Buffer> {
  const bytes = await getObject(file.key)
  setResponseHeaders(event, {
    'content-type': file.type,
    'content-disposition': `${getQuery(event).download ? 'attachment' : 'inline'}; filename="${file.name}"`,
    // Content-addressed and immutable.
    'cache-control': 'private, max-age=31536000, immutable',
    'x-content-type-options': 'nosniff',
    'content-security-policy': SANDBOX,
  })
  return bytes
}

/** A cut sheet's files, one per sheet, and their common name. */
export interface CutSheetFiles { files: string[]; name: string }

function cutSheetHeaders(event: H3Event, name: string, format: 'svg' | 'dxf', sheet: number, sheets: number) {
  const suffix = sheets > 1 ? `-sheet${sheet}of${sheets}` : ''
  setResponseHeaders(event, {
    'content-type': format === 'svg' ? 'image/svg+xml' : 'application/dxf',
    'content-disposition': `attachment; filename="${name}${suffix}.${format}"`,
    'x-content-type-options': 'nosniff',
    'content-security-policy': SANDBOX,
    'x-sheet-count': String(sheets),
  })
}

/** Sheet number `sheet` (from 1) of a cut sheet written on the spot. */
export function sendCutSheet(event: H3Event, sheets: CutSheetFiles, format: 'svg' | 'dxf', sheet: number): string {
  const file = sheets.files[sheet - 1]
  if (!file) throw createError({ statusCode: 404, message: `This job has ${sheets.files.length} sheet${sheets.files.length === 1 ? '' : 's'}.` })
  cutSheetHeaders(event, sheets.name, format, sheet, sheets.files.length)
  return file
}

/** One kept sheet of a job's or batch's cut sheet; says whether it was read back from the store or built for this request. */
export function sendSheetFile(event: H3Event, file: { bytes: Buffer; sheets: number; fromStore: boolean; name: string }, format: 'svg' | 'dxf', sheet: number): Buffer {
  cutSheetHeaders(event, file.name, format, sheet, file.sheets)
  setResponseHeaders(event, { 'x-sheet-from': file.fromStore ? 'store' : 'built' })
  return file.bytes
}
