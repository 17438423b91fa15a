// Reading request bodies a piece at a time, never more than a limit. A body over its limit is
// answered 413 as soon as the limit is passed, and nothing more of it is kept: a chunked or
// huge body stops flowing and the connection closes once the answer is out, so a body of any
// size costs at most its limit in memory and no long stretch of the event loop.
import { Readable } from 'node:stream'
import { createError, readRawBody, type H3Event } from 'h3'
import { UPLOAD_ENVELOPE_BYTES, UPLOAD_LIMIT_BYTES } from '#shared/constants/uploads'

/** A declared body up to this size is read to its end and thrown away after a 413 (see stopReading). */
export const DRAIN_LIMIT_BYTES = 2 * (UPLOAD_LIMIT_BYTES + UPLOAD_ENVELOPE_BYTES)

/** 413 with a sentence; what is left of the body is not kept (see stopReading). */
export function bodyTooLarge(event: H3Event, message: string): Error {
  stopReading(event)
  return createError({ statusCode: 413, message })
}

/**
 * Stops taking the request's body. A body that declared a moderate length (at most
 * DRAIN_LIMIT_BYTES) is read on and thrown away, so the client can finish sending and read its
 * 413: a connection closed under a client still sending loses the answer with it (the reset
 * discards what the client had not yet read). Any other body stops flowing, and the answer says
 * "Connection: close", on which Node closes the connection as soon as the answer is written.
 * Either way nothing more of it is kept in memory.
 */
export function stopReading(event: H3Event): void {
  const { req, res } = event.node
  req.unpipe()
  const declared = Number(req.headers['content-length'])
  if (declared > 0 && declared <= DRAIN_LIMIT_BYTES) {
    req.resume()
    return
  }
  req.pause()
  if (!res.headersSent) res.setHeader('connection', 'close')
}

/** The request as a Node stream, or undefined for a request made inside the server (no stream). */
export function requestStream(event: H3Event): Readable | undefined {
  return event.node.req instanceof Readable ? event.node.req : undefined
}

/** The whole body as bytes, refused with 413 (`message`) once it passes `limit` bytes. */
export async function readBodyUpTo(event: H3Event, limit: number, message: string): Promise<Buffer> {
  const req = requestStream(event)
  if (!req) {
    // A request from inside the server (server-side rendering) carries its body already.
    const raw = await readRawBody(event, false)
    if (raw && raw.byteLength > limit) throw createError({ statusCode: 413, message })
    return Buffer.from(raw ?? [])
  }
  return new Promise<Buffer>((resolve, reject) => {
    const chunks: Buffer[] = []
    let size = 0
    const done = () => {
      req.off('data', onData).off('end', onEnd).off('error', onError).off('close', onClose)
    }
    const onData = (chunk: Buffer) => {
      size += chunk.byteLength
      if (size > limit) {
        done()
        reject(bodyTooLarge(event, message))
        return
      }
      chunks.push(chunk)
    }
    const onEnd = () => { done(); resolve(Buffer.concat(chunks, size)) }
    const onError = () => { done(); reject(unreadable()) }
    // The client went away before the end.
    const onClose = () => { done(); reject(unreadable()) }
    req.on('data', onData).once('end', onEnd).once('error', onError).once('close', onClose)
  })
}

/**
 * Bytes gathered piece by piece into one block of shared memory, copied a piece at a time as
 * they arrive: no copy of the whole at the end, and a worker thread reads them without a copy
 * (postMessage shares a SharedArrayBuffer instead of cloning it). Either would hold up the
 * event loop for tens of milliseconds on 25 MB.
 */
export class SharedBytes {
  private block: Uint8Array
  private size = 0

  /** `expected`: the size if known (a Content-Length), else a first guess; the block grows when needed. */
  constructor(expected: number) {
    this.block = new Uint8Array(new SharedArrayBuffer(Math.max(expected, 64 * 1024)))
  }

  push(chunk: Uint8Array): void {
    if (this.size + chunk.byteLength > this.block.byteLength) {
      const bigger = new Uint8Array(new SharedArrayBuffer(Math.max(this.block.byteLength * 2, this.size + chunk.byteLength)))
      bigger.set(this.block.subarray(0, this.size))
      this.block = bigger
    }
    this.block.set(chunk, this.size)
    this.size += chunk.byteLength
  }

  get byteLength(): number {
    return this.size
  }

  /** The bytes so far, as a Buffer over the shared block (no copy). */
  bytes(): Buffer {
    return Buffer.from(this.block.buffer, 0, this.size)
  }
}

export function unreadable(): Error {
  return createError({ statusCode: 400, message: 'The request body could not be read to its end.' })
}
