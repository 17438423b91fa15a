import type { ApiClient, Reply } from './client'

/** POST /api/artworks as the browser's FormData would send it. */
export async function uploadArtwork(c: ApiClient, o: { file: Uint8Array; fileName?: string; title?: string; teamId?: number | string; widthMm?: number | string; type?: string }): Promise<Reply> {
  const form = new FormData()
  form.set('file', new Blob([new Uint8Array(o.file)], { type: o.type ?? 'application/octet-stream' }), o.fileName ?? 'drawing.png')
  if (o.title !== undefined) form.set('title', o.title)
  if (o.teamId !== undefined) form.set('teamId', String(o.teamId))
  if (o.widthMm !== undefined) form.set('widthMm', String(o.widthMm))
  const headers: Record<string, string> = { accept: 'application/json' }
  if (c.cookies.size) headers.cookie = [...c.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
  const r = await fetch(new URL('/api/artworks', c.baseUrl), { method: 'POST', body: form, headers })
  const text = await r.text()
  let body: any = text
  try { body = JSON.parse(text) } catch { /* not JSON */ }
  return { status: r.status, body, headers: r.headers }
}
