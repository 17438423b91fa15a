// A small HTTP client for API tests that keeps the session cookie like a browser does.
import http from 'node:http'
import { inject } from 'vitest'

export interface Reply<T = any> { status: number; body: T; headers: Headers }

export interface ClientOptions {
  /** A loopback address to send from (127.0.0.2, 127.0.0.3 …), so the app sees another client. */
  source?: string
}

/** One request over node:http, bound to a local address; fetch cannot choose its source. */
function sendFrom(source: string, url: URL, method: string, headers: Record<string, string>, body?: string): Promise<Response> {
  return new Promise((resolve, reject) => {
    const req = http.request(url, { method, headers, localAddress: source }, (res) => {
      const chunks: Buffer[] = []
      res.on('data', (c: Buffer) => chunks.push(c))
      res.on('end', () => {
        const h = new Headers()
        for (const [k, v] of Object.entries(res.headers)) for (const one of [v].flat()) if (one !== undefined) h.append(k, one)
        resolve(new Response([204, 304].includes(res.statusCode!) ? null : Buffer.concat(chunks), { status: res.statusCode, headers: h }))
      })
      res.on('error', reject)
    })
    req.on('error', reject)
    req.end(body)
  })
}

export class ApiClient {
  cookies = new Map<string, string>()
  constructor(readonly baseUrl = inject('baseUrl'), readonly options: ClientOptions = {}) {}

  async request<T = any>(method: string, path: string, body?: unknown, headers: Record<string, string> = {}): Promise<Reply<T>> {
    const h: Record<string, string> = { accept: 'application/json', ...headers }
    if (this.cookies.size) h.cookie = [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; ')
    let payload: string | undefined
    if (body !== undefined) {
      payload = typeof body === 'string' ? body : JSON.stringify(body)
      h['content-type'] ??= 'application/json'
    }
    const url = new URL(path, this.baseUrl)
    const r = this.options.source
      ? await sendFrom(this.options.source, url, method, h, payload)
      : await fetch(url, { method, headers: h, body: payload, redirect: 'manual' })
    for (const c of r.headers.getSetCookie()) {
      const [pair] = c.split(';')
      const i = pair!.indexOf('=')
      const name = pair!.slice(0, i)
      const value = pair!.slice(i + 1)
      if (!value || /max-age=0/i.test(c)) this.cookies.delete(name)
      else this.cookies.set(name, value)
    }
    const text = await r.text()
    let parsed: any = text
    try { parsed = text ? JSON.parse(text) : null } catch { /* not JSON */ }
    return { status: r.status, body: parsed, headers: r.headers }
  }

  get<T = any>(path: string) { return this.request<T>('GET', path) }
  post<T = any>(path: string, body?: unknown, headers?: Record<string, string>) { return this.request<T>('POST', path, body ?? {}, headers) }
  patch<T = any>(path: string, body: unknown) { return this.request<T>('PATCH', path, body) }
  put<T = any>(path: string, body: unknown) { return this.request<T>('PUT', path, body) }
  delete<T = any>(path: string) { return this.request<T>('DELETE', path) }

  async signIn(email: string, password: string): Promise<Reply> {
    const r = await this.post('/api/auth/sign-in', { email, password })
    if (r.status !== 200) throw new Error(`sign-in as ${email} answered ${r.status}: ${JSON.stringify(r.body)}`)
    return r
  }
}

export async function signedIn(email: string, password: string, options: ClientOptions & { baseUrl?: string } = {}): Promise<ApiClient> {
  const c = new ApiClient(options.baseUrl ?? inject('baseUrl'), options)
  await c.signIn(email, password)
  return c
}

/** Every item of a list the API hands out a page at a time, following `nextCursor`. */
export async function allPages<T = any>(c: ApiClient, path: string): Promise<T[]> {
  const items: T[] = []
  let cursor: string | null = null
  do {
    const url = new URL(path, c.baseUrl)
    if (cursor) url.searchParams.set('cursor', cursor)
    const r = await c.get<{ items: T[]; nextCursor: string | null }>(`${url.pathname}${url.search}`)
    if (r.status !== 200) throw new Error(`GET ${url.pathname}${url.search} answered ${r.status}: ${JSON.stringify(r.body)}`)
    items.push(...r.body.items)
    cursor = r.body.nextCursor
  } while (cursor)
  return items
}

let counter = 0
/** A fresh, unique address for a test, so files do not trip over each other's data. */
export function uniqueEmail(tag: string): string {
  return `${tag}.${process.pid}.${Date.now().toString(36)}.${counter++}@tests.example`
}
