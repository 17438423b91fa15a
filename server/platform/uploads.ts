// Multipart uploads, parsed as they arrive by busboy (a streaming parser): the picture is
// copied into shared memory and hashed piece by piece, and an upload over the limit is answered
// 413 the moment it passes the limit, without reading the rest. No step works on the whole body
// at once, so a legal 25 MB upload never holds up the event loop.
import { createHash } from 'node:crypto'
import busboy from 'busboy'
import { createError, getRequestHeader, type H3Event } from 'h3'
import { z } from 'zod'
import { UPLOAD_ENVELOPE_BYTES, UPLOAD_LIMIT_BYTES } from '#shared/constants/uploads'
import { bodyTooLarge, requestStream, SharedBytes, stopReading, unreadable } from './body'
import { formatBytes } from './http'

export interface Upload<T> {
  fields: T
  fileName: string
  bytes: Uint8Array
  /** SHA-256 of the bytes, hex, worked out while they arrived. */
  contentHash: string
}

const TOO_LARGE = `The picture is larger than ${formatBytes(UPLOAD_LIMIT_BYTES)}. Save it at a smaller size or as JPEG.`
/** A form's text fields are short; anything longer is not one of our forms. */
const FIELD_BYTES = 16 * 1024

interface Parsed { fields: Record<string, string>; file?: { name: string; bytes: SharedBytes; hash: string } }

/** Reads a multipart upload with one `file` part and text fields validated by `schema`. */
export async function readUpload<S extends z.ZodType>(event: H3Event, schema: S): Promise<Upload<z.output<S>>> {
  const type = getRequestHeader(event, 'content-type') ?? ''
  if (!type.startsWith('multipart/form-data')) {
    throw createError({ statusCode: 415, message: 'Send the picture as multipart/form-data with a "file" field.' })
  }
  const { fields, file } = await parseMultipart(event)
  const parsed = schema.safeParse(fields)
  const fieldErrors: Record<string, string[]> = parsed.success ? {} : { ...(z.flattenError(parsed.error).fieldErrors as Record<string, string[]>) }
  if (!file || file.bytes.byteLength === 0) fieldErrors.file = ['Choose a picture to upload.']
  if (Object.keys(fieldErrors).length) {
    throw createError({ statusCode: 400, message: `Please check the form: ${Object.values(fieldErrors)[0]![0]}`, data: { fieldErrors } })
  }
  event.context.bodyFingerprint = createHash('sha256').update(JSON.stringify([fields, file!.name, file!.hash])).digest('hex')
  const bytes = file!.bytes.bytes()
  return { fields: (parsed as { data: z.output<S> }).data, fileName: file!.name, bytes: new Uint8Array(bytes.buffer, bytes.byteOffset, bytes.byteLength), contentHash: file!.hash }
}

function parseMultipart(event: H3Event): Promise<Parsed> {
  const req = requestStream(event)
  if (!req) throw createError({ statusCode: 415, message: 'Send the picture over HTTP as multipart/form-data.' })
  let parser: busboy.Busboy
  try {
    parser = busboy({
      headers: event.node.req.headers,
      limits: { fileSize: UPLOAD_LIMIT_BYTES, files: 1, fields: 20, parts: 30, fieldSize: FIELD_BYTES },
    })
  } catch {
    throw createError({ statusCode: 400, message: 'The upload is not a well-formed multipart form.' })
  }
  return new Promise<Parsed>((resolve, reject) => {
    const result: Parsed = { fields: {} }
    let settled = false
    let received = 0
    const finish = (err?: Error) => {
      if (settled) return
      settled = true
      req.off('data', count).off('close', onClose)
      if (err) {
        stopReading(event)
        reject(err)
      } else resolve(result)
    }
    // The envelope around the picture is small; a body far beyond both is refused while it arrives.
    const count = (chunk: Buffer) => {
      received += chunk.byteLength
      if (received > UPLOAD_LIMIT_BYTES + UPLOAD_ENVELOPE_BYTES) finish(bodyTooLarge(event, TOO_LARGE))
    }
    const onClose = () => { if (!req.readableEnded) finish(unreadable()) }

    parser.on('field', (name, value, info) => {
      if (info.valueTruncated) finish(createError({ statusCode: 400, message: `The form field "${name.slice(0, 40)}" is too long.` }))
      else result.fields[name] = value
    })
    parser.on('file', (name, stream, info) => {
      // Only the first "file" part is ours; anything else is drained and forgotten.
      if (name !== 'file' || result.file) { stream.resume(); return }
      const hash = createHash('sha256')
      // The declared length bounds the picture: one block, filled as the pieces arrive.
      const declared = Number(event.node.req.headers['content-length']) || 0
      const file = { name: info.filename ?? '', bytes: new SharedBytes(Math.min(declared, UPLOAD_LIMIT_BYTES) || 1024 * 1024), hash: '' }
      result.file = file
      stream.on('data', (chunk: Buffer) => {
        file.bytes.push(chunk)
        hash.update(chunk)
      })
      stream.on('limit', () => finish(bodyTooLarge(event, TOO_LARGE)))
      stream.on('end', () => { file.hash = hash.digest('hex') })
      stream.on('error', () => finish(unreadable()))
    })
    parser.on('filesLimit', () => finish(createError({ statusCode: 400, message: 'Send one picture at a time.' })))
    parser.on('partsLimit', () => finish(createError({ statusCode: 400, message: 'The form has more parts than ours do.' })))
    parser.on('fieldsLimit', () => finish(createError({ statusCode: 400, message: 'The form has more fields than ours do.' })))
    parser.on('error', () => finish(createError({ statusCode: 400, message: 'The upload is not a well-formed multipart form.' })))
    parser.on('close', () => finish())
    req.on('data', count).on('close', onClose)
    req.pipe(parser)
  })
}
