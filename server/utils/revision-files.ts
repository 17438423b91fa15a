import type { H3Event } from 'h3'
import type { findRevision } from './artworks'
import { fileSlug } from './file-names'

type RevisionRow = Awaited<ReturnType<typeof findRevision>>

const EXTENSIONS: Record<string, string> = { 'image/jpeg': 'jpg', 'image/png': 'png', 'image/webp': 'webp', 'image/tiff': 'tif', 'image/gif': 'gif', 'image/avif': 'avif' }

/** One stored file of a revision with its content type and a file name people can recognise. */
export async function sendRevisionFile(event: H3Event, row: RevisionRow, kind: 'vector' | 'prepared' | 'outline' | 'source'): Promise<Buffer> {
  const base = `${fileSlug(row.title, 60, 'artwork')}-r${row.number}`
  const file = {
    vector: { key: row.vector_key, type: 'image/svg+xml', name: `${base}.svg` },
    outline: { key: row.outline_key, type: 'image/svg+xml', name: `${base}-outline-px.svg` },
    prepared: { key: row.prepared_key, type: 'image/png', name: `${base}-prepared.png` },
    source: { key: row.source_key, type: row.media_type, name: `${base}-source.${EXTENSIONS[row.media_type] ?? 'bin'}` },
  }[kind]
  const bytes = await getObject(file.key)
  setResponseHeaders(event, {
    'content-type': file.type,
    'content-disposition': `${getQuery(event).download ? 'attachment' : 'inline'}; filename="${file.name}"`,
    // Content-addressed and immutable.
    'cache-control': 'private, max-age=31536000, immutable',
    'x-content-type-options': 'nosniff',
    // An SVG opened directly must not run anything.
    'content-security-policy': "default-src 'none'; style-src 'unsafe-inline'; sandbox",
  })
  return bytes
}
