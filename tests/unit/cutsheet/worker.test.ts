// The worker thread's entry, run in this thread: plain data in, plain data and bytes out.
import { mkdtempSync, rmSync } from 'node:fs'
import os from 'node:os'
import path from 'node:path'
import { GetObjectCommand, S3Client } from '@aws-sdk/client-s3'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { packBatch } from '../../../server/cutsheet/pack'
import { readCleanVector } from '../../../server/cutsheet/path'
import { buildCutSheets, type BatchSheetInput } from '../../../server/cutsheet/sheet'
import { testGrid } from '../../../server/cutsheet/test-grid'
import { keepCutSheets, keptSheetKey, runCutSheetRequest } from '../../../server/cutsheet/worker'
import { packCurves } from '../../../server/cutsheet/curve-buffer'
import { L_BOX, L_PATH, svgMm } from './shapes'

const L = readCleanVector(svgMm(L_BOX.width, L_BOX.height, [L_PATH]))
const input: BatchSheetInput = {
  designs: [{ id: 'J7', curves: L.curves, widthMm: L.widthMm, heightMm: L.heightMm, count: 9 }],
  sheetWidthMm: 200, sheetHeightMm: 120, gapMm: 4, marginMm: 5, kerfMm: 0.2, labels: { mode: 'text' }, weedingLines: { spacingMm: 12, clearanceMm: 1 },
}

describe('runCutSheetRequest', () => {
  it('answers a batch with the same files as buildCutSheets, as bytes, and nothing a thread cannot pass', () => {
    const { answer, bytes } = runCutSheetRequest({ kind: 'batch', input: structuredClone(input) })
    if (!answer.ok || answer.kind !== 'batch') throw new Error('expected a batch answer')
    const direct = buildCutSheets(input)
    const text = new TextDecoder()
    expect(answer.result.sheets.map((s) => text.decode(s.svg))).toEqual(direct.sheets.map((s) => s.svg))
    expect(answer.result.sheets.map((s) => text.decode(s.dxf))).toEqual(direct.sheets.map((s) => s.dxf))
    expect(bytes).toHaveLength(2 * direct.sheets.length)
    // structuredClone is the algorithm postMessage uses between threads (HTML Living Standard).
    expect(structuredClone(answer)).toEqual(answer)
  })

  it('answers the same bytes whether the curves come as objects, packed in a typed array, or as the stored vector read in the thread', () => {
    const text = new TextDecoder()
    const files = (r: ReturnType<typeof runCutSheetRequest>) => {
      const a = r.answer
      if (!a.ok || a.kind === 'pack' || a.kind === 'test-grid' || a.kind === 'keep-vectors') throw new Error(`expected sheets, got ${JSON.stringify(a)}`)
      return a.result.sheets.map((s) => [text.decode(s.svg), text.decode(s.dxf)])
    }
    const objects = files(runCutSheetRequest({ kind: 'batch', input: structuredClone(input) }))
    const packed = files(runCutSheetRequest({ kind: 'batch-packed', input: { ...input, designs: input.designs.map(({ curves, ...d }) => ({ ...d, packed: packCurves(curves) })) } }))
    // The stored vector drawn twice as large, placed at the L's own width: the thread scales it back.
    const stored = new TextEncoder().encode(svgMm(L_BOX.width * 2, L_BOX.height * 2, [L_PATH.replace(/-?\d+(\.\d+)?/g, (n) => String(Number(n) * 2))]))
    const vectors = files(runCutSheetRequest({ kind: 'batch-vectors', input: { ...input, designs: input.designs.map(({ curves: _c, heightMm: _h, ...d }) => ({ ...d, vector: stored })) } }))
    expect(packed).toEqual(objects)
    expect(vectors).toEqual(objects)
  })

  it('answers a test grid, and turns refused input into a plain answer', () => {
    const g = { power: { from: 30, to: 60, steps: 4 }, speed: { from: 5, to: 20, steps: 4 } }
    const { answer } = runCutSheetRequest({ kind: 'test-grid', input: g })
    if (!answer.ok || answer.kind !== 'test-grid') throw new Error('expected a test grid answer')
    expect(new TextDecoder().decode(answer.result.dxf)).toBe(testGrid(g).dxf)
    expect(answer.result.squares).toHaveLength(16)
    const bad = runCutSheetRequest({ kind: 'batch', input: { ...input, kerfMm: -1 } })
    expect(bad.answer).toEqual({ ok: false, kind: 'settings', message: expect.stringMatching(/kerf must be between/) })
  })

  it('answers where the copies go, as packBatch does in this thread, for the pages\' layout', () => {
    const { curves: _curves, ...boxes } = input.designs[0]!
    const pack = { ...input, designs: [boxes] }
    const { answer, bytes } = runCutSheetRequest({ kind: 'pack', input: pack })
    if (!answer.ok || answer.kind !== 'pack') throw new Error('expected a pack answer')
    expect(answer.result).toEqual(packBatch(pack))
    expect(answer.result.copies).toHaveLength(9)
    expect(bytes).toHaveLength(0)
  })
})

// A kept set is stored by the thread itself (its tens of megabytes never reach the server's
// thread), into a real S3 API: s3rver, the project's local object store, in this process.
describe('keepCutSheets', () => {
  const store = { endpoint: '', region: 'us-east-1', bucket: 'keep-test', accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER', forcePathStyle: true }
  const stored = new TextEncoder().encode(svgMm(L_BOX.width, L_BOX.height, [L_PATH]))
  const vectors = { ...input, designs: input.designs.map(({ curves: _c, heightMm: _h, ...d }) => ({ ...d, vector: stored })) }
  let server: { close: (cb: () => void) => void } | undefined
  let dir = ''

  beforeAll(async () => {
    dir = mkdtempSync(path.join(os.tmpdir(), 'decalwright-keep-'))
    const { default: S3rver } = await import('s3rver')
    const s = new S3rver({ port: 0, address: '127.0.0.1', directory: dir, silent: true, configureBuckets: [{ name: store.bucket, configs: [] }] } as never)
    const at = await s.run() as { port: number }
    store.endpoint = `http://127.0.0.1:${at.port}`
    server = s
  })
  afterAll(async () => {
    await new Promise<void>((resolve) => server ? server.close(() => resolve()) : resolve())
    rmSync(dir, { recursive: true, force: true })
  })

  it('stores each sheet\'s SVG and DXF under the prefix, byte for byte the files asked for as bytes, and answers only their figures', async () => {
    const answer = await keepCutSheets(vectors, { prefix: 'cut-sheets/k1/', store: { s3: store, s3TimeoutMs: 5000 } })
    if (!answer.ok || answer.kind !== 'keep-vectors') throw new Error(`expected a kept set, got ${JSON.stringify(answer)}`)
    const { answer: asBytes } = runCutSheetRequest({ kind: 'batch-vectors', input: vectors })
    if (!asBytes.ok || asBytes.kind !== 'batch-vectors') throw new Error('expected sheets')
    expect(answer.result.sheets.length).toBe(asBytes.result.sheets.length)
    const s3 = new S3Client({ endpoint: store.endpoint, region: store.region, forcePathStyle: true, credentials: { accessKeyId: 'S3RVER', secretAccessKey: 'S3RVER' } })
    for (const [i, sheet] of asBytes.result.sheets.entries()) {
      for (const format of ['svg', 'dxf'] as const) {
        const r = await s3.send(new GetObjectCommand({ Bucket: store.bucket, Key: keptSheetKey('cut-sheets/k1/', i + 1, format) }))
        const body = await r.Body!.transformToByteArray()
        expect(Buffer.from(body).equals(Buffer.from(sheet[format]!)), `sheet ${i + 1} ${format}`).toBe(true)
        expect(answer.result.sheets[i]![format === 'svg' ? 'svgBytes' : 'dxfBytes']).toBe(body.byteLength)
      }
      const { svg: _s, dxf: _d, ...figures } = sheet
      expect(answer.result.sheets[i]).toMatchObject(figures)
    }
    s3.destroy()
    // Nothing but figures crosses back: the answer is a few kilobytes whatever the files weigh.
    expect(JSON.stringify(answer).length).toBeLessThan(20_000)
  })

  it('answers a store that does not answer as a store fault, and refuses a set without both files', async () => {
    const down = await keepCutSheets(vectors, { prefix: 'cut-sheets/k2/', store: { s3: { ...store, endpoint: 'http://127.0.0.1:9' }, s3TimeoutMs: 1000 } })
    expect(down).toMatchObject({ ok: false, kind: 'store' })
    const half = await keepCutSheets({ ...vectors, formats: { svg: true, dxf: false } }, { prefix: 'cut-sheets/k3/', store: { s3: store, s3TimeoutMs: 5000 } })
    expect(half).toMatchObject({ ok: false, kind: 'settings' })
  })
})
