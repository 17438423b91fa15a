// Two guards for every state-changing API request:
// - cross-site request forgery: a browser names the page's origin in Origin and
//   Sec-Fetch-Site; a request from another site is refused. (OWASP Cross-Site Request
//   Forgery Prevention Cheat Sheet, "Verifying Origin With Standard Headers"; the session
//   cookie is also SameSite=Lax.)
// - body size: JSON bodies are small; a declared length over the limit is refused with 413
//   before anything is read, and nothing of it is kept (server/platform/body.ts stopReading).
//   Routes that take files set their own, larger limit. A body sent without a length is
//   limited while it is read (server/platform/body.ts, server/platform/uploads.ts).
import { bodyTooLarge } from '../platform/body'
import { formatBytes } from '../platform/http'
import { requestHost } from '../platform/client-address'

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

export default defineEventHandler((event) => {
  if (!event.path.startsWith('/api/') || SAFE.has(event.method)) return
  const site = getRequestHeader(event, 'sec-fetch-site')
  if (site && site !== 'same-origin' && site !== 'none') {
    throw createError({ statusCode: 403, message: 'This request came from another site and was refused.' })
  }
  const origin = getRequestHeader(event, 'origin')
  if (origin) {
    // The host the request was sent to; a forwarded host counts only from a trusted proxy.
    const host = requestHost(event)
    let originHost = ''
    try { originHost = new URL(origin).host } catch { /* "null" or garbage */ }
    if (originHost !== host) {
      throw createError({ statusCode: 403, message: 'This request came from another site and was refused.' })
    }
  }
  const length = Number(getRequestHeader(event, 'content-length') ?? 0)
  const limit = bodyLimitFor(event.path)
  if (length > limit) {
    throw bodyTooLarge(event, `The request is too large (limit ${formatBytes(limit)}).`)
  }
})
