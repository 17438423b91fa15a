/** A title as the readable part of a download's file name: ASCII words joined by dashes. */
export function fileSlug(title: string, maxLength: number, fallback: string): string {
  return title.normalize('NFKD').replace(/[^\w\s-]/g, '').trim().replace(/\s+/g, '-').toLowerCase().slice(0, maxLength) || fallback
}
