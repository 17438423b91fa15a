import { createError, getRequestHeader, readMultipartFormData, type H3Event } from 'h3'
import { z } from 'zod'
import { UPLOAD_LIMIT_BYTES } from '#shared/constants/uploads'
import { formatBytes } from './http'

export interface Upload<T> { fields: T; fileName: string; bytes: Uint8Array }

/** Reads a multipart upload with one `file` part and text fields validated by `schema`. */
export async function readUpload<S extends z.ZodType>(event: H3Event, schema: S): Promise<Upload<z.output<S>>> {
  const type = getRequestHeader(event, 'content-type') ?? ''
  if (!type.startsWith('multipart/form-data')) {
    throw createError({ statusCode: 415, message: 'Send the picture as multipart/form-data with a "file" field.' })
  }
  const parts = await readMultipartFormData(event)
  const total = (parts ?? []).reduce((n, p) => n + p.data.byteLength, 0)
  if (total > UPLOAD_LIMIT_BYTES) throw createError({ statusCode: 413, message: `The picture is larger than ${formatBytes(UPLOAD_LIMIT_BYTES)}. Save it at a smaller size or as JPEG.` })
  const fields: Record<string, string> = {}
  let file: { name: string; data: Uint8Array } | undefined
  for (const p of parts ?? []) {
    if (p.name === 'file' && p.filename !== undefined) file = { name: p.filename, data: p.data }
    else if (p.name) fields[p.name] = p.data.toString('utf8')
  }
  const parsed = schema.safeParse(fields)
  const fieldErrors: Record<string, string[]> = parsed.success ? {} : { ...(z.flattenError(parsed.error).fieldErrors as Record<string, string[]>) }
  if (!file || file.data.byteLength === 0) fieldErrors.file = ['Choose a picture to upload.']
  if (Object.keys(fieldErrors).length) {
    throw createError({ statusCode: 400, message: `Please check the form: ${Object.values(fieldErrors)[0]![0]}`, data: { fieldErrors } })
  }
  return { fields: (parsed as { data: z.output<S> }).data, fileName: file!.name, bytes: new Uint8Array(file!.data.buffer, file!.data.byteOffset, file!.data.byteLength) }
}
