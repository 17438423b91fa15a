// Bodies are limited while they are read, not after: a chunked upload or JSON body far over
// the limit is refused with 413 after the limit's worth of bytes, and the app stays up.
import { describe, expect, inject, it } from 'vitest'
import { ApiClient, signedIn } from '../support/client'
import { DEMO_ACCOUNTS, DEMO_PASSWORD } from '../support/demo'
import { teamId } from '../support/scenario'

const MB = 1024 * 1024

/** A body of `total` bytes sent in chunks (no Content-Length), counting how much the server pulled. */
function chunked(total: number, head: Uint8Array, fill: number, tail = new Uint8Array()) {
  let sent = 0
  const chunk = new Uint8Array(256 * 1024).fill(fill)
  const counter = { pulled: 0 }
  const stream = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (sent === 0) { controller.enqueue(head); sent += head.byteLength; counter.pulled = sent; return }
      if (sent >= total) { controller.enqueue(tail); controller.close(); return }
      controller.enqueue(chunk)
      sent += chunk.byteLength
      counter.pulled = sent
    },
  })
  return { stream, counter }
}

async function post(path: string, body: ReadableStream<Uint8Array>, headers: Record<string, string>): Promise<number | 'closed'> {
  try {
    const r = await fetch(new URL(path, inject('baseUrl')), { method: 'POST', body, headers, duplex: 'half', signal: AbortSignal.timeout(60_000) } as RequestInit)
    await r.text()
    return r.status
  } catch {
    // The server may close the connection as soon as it has answered 413.
    return 'closed'
  }
}

async function healthy(): Promise<number> {
  return (await fetch(new URL('/api/health', inject('baseUrl')), { signal: AbortSignal.timeout(5000) })).status
}

describe('body limits', () => {
  it('a chunked 160 MB upload from a student is refused at the limit and the app stays up', async () => {
    const student = await signedIn(DEMO_ACCOUNTS.student.email, DEMO_PASSWORD)
    const boundary = 'dwboundary'
    const head = new TextEncoder().encode(`--${boundary}\r\nContent-Disposition: form-data; name="title"\r\n\r\nHuge\r\n--${boundary}\r\nContent-Disposition: form-data; name="teamId"\r\n\r\n${await teamId()}\r\n--${boundary}\r\nContent-Disposition: form-data; name="file"; filename="huge.png"\r\nContent-Type: image/png\r\n\r\n`)
    const { stream, counter } = chunked(160 * MB, head, 7, new TextEncoder().encode(`\r\n--${boundary}--\r\n`))
    const status = await post('/api/artworks', stream, {
      'content-type': `multipart/form-data; boundary=${boundary}`,
      cookie: [...student.cookies].map(([k, v]) => `${k}=${v}`).join('; '),
    })
    expect(status === 413 || status === 'closed', String(status)).toBe(true)
    // The server stopped reading near the 25 MB limit, not at the end.
    expect(counter.pulled).toBeLessThan(60 * MB)
    expect(await healthy()).toBe(200)
  })

  it('a chunked 300 MB JSON body to sign-in, anonymous, is refused at the limit', async () => {
    const { stream, counter } = chunked(300 * MB, new TextEncoder().encode('{"email":"a@b.example","password":"'), 0x61, new TextEncoder().encode('"}'))
    const status = await post('/api/auth/sign-in', stream, { 'content-type': 'application/json' })
    expect(status === 413 || status === 'closed', String(status)).toBe(true)
    expect(counter.pulled).toBeLessThan(20 * MB)
    expect(await healthy()).toBe(200)
    // A normal request still works afterwards.
    expect((await new ApiClient().post('/api/auth/sign-in', { email: DEMO_ACCOUNTS.student.email, password: DEMO_PASSWORD })).status).toBe(200)
  })

  it('a declared length over the limit is refused before reading, with a sentence', async () => {
    const r = await new ApiClient().request('POST', '/api/auth/sign-in', JSON.stringify({ email: 'x@y.example', password: 'y'.repeat(70 * 1024) }))
    expect(r.status).toBe(413)
    expect(r.body.message).toMatch(/too large/)
  })
})
