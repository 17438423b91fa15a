// What an upload may be, for the server's checks and the forms' early ones alike.

/** Largest picture accepted, bytes. */
export const UPLOAD_LIMIT_BYTES = 25 * 1024 * 1024
/** Room for the multipart envelope (boundaries, field names, the title) around the picture. */
export const UPLOAD_ENVELOPE_BYTES = 64 * 1024
/** Largest source in pixels: beyond it decoding alone takes too long and too much memory. */
export const MAX_SOURCE_PIXELS = 60_000_000
/** Smallest side of a source in pixels: below it there is no drawing to outline, only a dot. */
export const MIN_SOURCE_SIDE_PX = 16

/**
 * The pictures we take. The server decides by the file's content (sharp's `format`; AVIF is
 * reported as HEIF with AV1 compression); names and browser types only guide the forms.
 */
export const ACCEPTED_MEDIA = [
  { format: 'jpeg', label: 'JPEG', mediaType: 'image/jpeg', extension: 'jpg', extensions: ['jpg', 'jpeg', 'jpe'] },
  { format: 'png', label: 'PNG', mediaType: 'image/png', extension: 'png', extensions: ['png'] },
  { format: 'webp', label: 'WebP', mediaType: 'image/webp', extension: 'webp', extensions: ['webp'] },
  { format: 'tiff', label: 'TIFF', mediaType: 'image/tiff', extension: 'tif', extensions: ['tif', 'tiff'] },
  { format: 'gif', label: 'GIF', mediaType: 'image/gif', extension: 'gif', extensions: ['gif'] },
  { format: 'avif', label: 'AVIF', mediaType: 'image/avif', extension: 'avif', extensions: ['avif'] },
] as const
export type AcceptedMedia = (typeof ACCEPTED_MEDIA)[number]

/** "JPEG, PNG, WebP, TIFF, GIF or AVIF" */
export const UPLOAD_KINDS = `${ACCEPTED_MEDIA.slice(0, -1).map((m) => m.label).join(', ')} or ${ACCEPTED_MEDIA.at(-1)!.label}`

/** For `<input type="file" accept>`. */
export const UPLOAD_ACCEPT = ACCEPTED_MEDIA.map((m) => m.mediaType).join(',')

/** The usual file extension for a stored source's media type. */
export function extensionFor(mediaType: string): string {
  return ACCEPTED_MEDIA.find((m) => m.mediaType === mediaType)?.extension ?? 'bin'
}
