// Starting the app refuses a port that another program holds, even one that answers the
// health check: the answer would come from that program (or from an earlier app with other
// settings still stopping there), not from the app just started.
import { createServer, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { afterEach, describe, expect, it } from 'vitest'
import { portIsFree, startApp } from '../../../scripts/lib/app-process'

let other: Server | undefined
afterEach(() => new Promise<void>((resolve) => { if (other) other.close(() => resolve()); else resolve() }))

describe('startApp', () => {
  it('refuses a port where another program answers the health check', async () => {
    other = createServer((_req, res) => { res.writeHead(200, { 'content-type': 'application/json' }); res.end('{"ok":true}') })
    await new Promise<void>((resolve) => other!.listen(0, '127.0.0.1', resolve))
    const port = (other.address() as AddressInfo).port
    expect(await portIsFree('127.0.0.1', port)).toBe(false)
    await expect(startApp({ port, host: '127.0.0.1', env: {}, quiet: true, portWaitMs: 300 })).rejects.toThrow(`Port ${port} on 127.0.0.1 is in use by another program`)
  })

  it('sees a port as free once its listener has closed', async () => {
    const s = createServer()
    await new Promise<void>((resolve) => s.listen(0, '127.0.0.1', resolve))
    const port = (s.address() as AddressInfo).port
    await new Promise<void>((resolve) => s.close(() => resolve()))
    expect(await portIsFree('127.0.0.1', port)).toBe(true)
  })
})
