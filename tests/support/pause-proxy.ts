// A TCP relay that a test can pause: while paused it keeps every connection open and passes
// nothing either way, as a stalled database or object store would (not a refused one).
import net from 'node:net'

export interface PauseProxy { port: number; pause: () => void; resume: () => void; close: () => Promise<void> }

export async function pauseProxy(target: { host: string; port: number }, port: number): Promise<PauseProxy> {
  let paused = false
  const pairs = new Set<[net.Socket, net.Socket]>()
  const server = net.createServer((client) => {
    const upstream = net.connect(target.port, target.host)
    const pair: [net.Socket, net.Socket] = [client, upstream]
    pairs.add(pair)
    client.pipe(upstream)
    upstream.pipe(client)
    // After pipe(), which sets both flowing: a connection opened while paused passes nothing either.
    if (paused) { client.pause(); upstream.pause() }
    const end = () => { client.destroy(); upstream.destroy(); pairs.delete(pair) }
    client.on('error', end).on('close', end)
    upstream.on('error', end).on('close', end)
  })
  await new Promise<void>((resolve) => server.listen(port, '127.0.0.1', resolve))
  return {
    port,
    pause: () => { paused = true; for (const [a, b] of pairs) { a.pause(); b.pause() } },
    resume: () => { paused = false; for (const [a, b] of pairs) { a.resume(); b.resume() } },
    close: () => new Promise<void>((resolve) => {
      for (const [a, b] of pairs) { a.destroy(); b.destroy() }
      server.close(() => resolve())
    }),
  }
}
