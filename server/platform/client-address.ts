// Where a request came from, and which host it was sent to. X-Forwarded-For and
// X-Forwarded-Host can be written by anyone, so they are believed only when the connection
// comes from a proxy the installation names (NUXT_TRUSTED_PROXIES); otherwise the socket's own
// address and the Host header decide. Rate limits, the history's addresses and the same-origin
// check all read these two functions.
import { BlockList, isIPv6 } from 'node:net'
import { getRequestHeader, type H3Event } from 'h3'
import { platformConfig } from './config'

let cached: { key: string; list: BlockList } | undefined

function trustedProxies(): BlockList {
  const entries = platformConfig().trustedProxies ?? []
  const key = entries.join(',')
  if (cached?.key === key) return cached.list
  const list = new BlockList()
  for (const entry of entries) {
    const [address, bits] = entry.split('/')
    const type = isIPv6(address!) ? 'ipv6' : 'ipv4'
    if (bits) list.addSubnet(address!, Number(bits), type)
    else list.addAddress(address!, type)
  }
  cached = { key, list }
  return list
}

/** "::ffff:127.0.0.1" → "127.0.0.1": an IPv4 peer on a dual-stack socket. */
function plain(address: string): string {
  return address.startsWith('::ffff:') && address.includes('.') ? address.slice(7) : address
}

function isTrusted(address: string): boolean {
  if (!address) return false
  try {
    return trustedProxies().check(address, isIPv6(address) ? 'ipv6' : 'ipv4')
  } catch {
    return false
  }
}

/** The client's address: the socket's, or, behind trusted proxies, the nearest address they did not add themselves. */
export function clientAddress(event: H3Event): string {
  const socket = plain(event.node.req.socket?.remoteAddress ?? '')
  if (!isTrusted(socket)) return socket || 'unknown'
  const forwarded = (getRequestHeader(event, 'x-forwarded-for') ?? '').split(',').map((s) => plain(s.trim())).filter(Boolean)
  // Walk back from the proxy nearest to us; the first address no trusted proxy owns is the client.
  for (let i = forwarded.length - 1; i >= 0; i--) if (!isTrusted(forwarded[i]!)) return forwarded[i]!
  return forwarded[0] ?? socket
}

/** The host the request was sent to: the Host header, or X-Forwarded-Host from a trusted proxy. */
export function requestHost(event: H3Event): string {
  const socket = plain(event.node.req.socket?.remoteAddress ?? '')
  const forwarded = isTrusted(socket) ? getRequestHeader(event, 'x-forwarded-host')?.split(',')[0]?.trim() : undefined
  return forwarded || getRequestHeader(event, 'host') || ''
}
