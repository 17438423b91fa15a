// The browser side of sending a picture. The server decides what a file is by its content;
// these checks only spare a student a long wait for an answer that is already known.
import { ACCEPTED_MEDIA, UPLOAD_KINDS, UPLOAD_LIMIT_BYTES } from '#shared/constants/uploads'

const ACCEPTED_TYPES = new Set<string>(ACCEPTED_MEDIA.map((m) => m.mediaType))
const ACCEPTED_EXTENSIONS = new Set<string>(ACCEPTED_MEDIA.flatMap((m) => m.extensions))

function extensionOf(name: string): string {
  const dot = name.lastIndexOf('.')
  return dot > 0 ? name.slice(dot + 1).toLowerCase() : ''
}

/** A title from a file name: the name without its extension, trimmed to the title's limit. */
export function titleFromFileName(name: string): string {
  const dot = name.lastIndexOf('.')
  const bare = (dot > 0 ? name.slice(0, dot) : name).trim()
  return bare.slice(0, 120)
}

/**
 * What can be said about a chosen file before sending it: a blocking problem (too large, empty)
 * or a hint that it may not be a picture we take (the server has the last word).
 */
export function checkChosenFile(file: File): { problem: string | null; hint: string | null } {
  if (file.size === 0) return { problem: 'This file is empty. Choose the photo or scan again.', hint: null }
  if (file.size > UPLOAD_LIMIT_BYTES) {
    return {
      problem: `This picture is ${fileSize(file.size)}; the limit is ${fileSize(UPLOAD_LIMIT_BYTES)}. Save it at a smaller size or as JPEG, then choose it again.`,
      hint: null,
    }
  }
  const ext = extensionOf(file.name)
  if (ext === 'heic' || ext === 'heif' || file.type === 'image/heic' || file.type === 'image/heif') {
    return { problem: null, hint: `HEIC photos cannot be read here. Export the photo as JPEG and choose that instead.` }
  }
  if (ACCEPTED_TYPES.has(file.type) || ACCEPTED_EXTENSIONS.has(ext)) return { problem: null, hint: null }
  return { problem: null, hint: `This does not look like a ${UPLOAD_KINDS} picture. You can still send it: Decalwright checks the file itself.` }
}

export type UploadPhase = 'sending' | 'outlining'

export interface UploadProgress {
  phase: UploadPhase
  /** Share of the bytes sent, 0…1; null when the browser cannot tell. */
  sent: number | null
}

/**
 * POSTs a form with XMLHttpRequest, which (unlike fetch) reports upload progress. Once every
 * byte is out the phase turns to 'outlining': the server is cleaning up and tracing.
 * Resolves with the JSON answer; rejects with { statusCode, data } like $fetch, so
 * apiProblem() reads it the same way.
 */
export function postWithProgress<T>(url: string, body: FormData, onProgress: (p: UploadProgress) => void, headers: Record<string, string> = {}): Promise<T> {
  return new Promise<T>((resolve, reject) => {
    const xhr = new XMLHttpRequest()
    xhr.open('POST', url)
    xhr.responseType = 'text'
    xhr.setRequestHeader('accept', 'application/json')
    for (const [name, value] of Object.entries(headers)) xhr.setRequestHeader(name, value)
    onProgress({ phase: 'sending', sent: 0 })
    xhr.upload.addEventListener('progress', (e) => {
      onProgress({ phase: 'sending', sent: e.lengthComputable && e.total > 0 ? e.loaded / e.total : null })
    })
    xhr.upload.addEventListener('load', () => onProgress({ phase: 'outlining', sent: 1 }))
    xhr.addEventListener('load', () => {
      let data: unknown = null
      try {
        data = xhr.responseText ? JSON.parse(xhr.responseText) : null
      } catch {
        data = null
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(data as T)
      else reject({ statusCode: xhr.status, data })
    })
    // No answer at all (network gone, or the server closed the connection mid-upload).
    xhr.addEventListener('error', () => reject({ statusCode: 0, data: null }))
    xhr.addEventListener('abort', () => reject({ statusCode: 0, data: null }))
    xhr.send(body)
  })
}
