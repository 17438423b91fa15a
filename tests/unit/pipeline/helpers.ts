// Test helpers: a seeded random generator, test images drawn in code, and the reference tracer.
import { execFileSync } from 'node:child_process'
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { dirname, join } from 'node:path'
import { fileURLToPath } from 'node:url'
import sharp from 'sharp'

/** Small seeded PRNG (mulberry32), uniform in [0, 1). */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

/** Standard normal sample (Box–Muller). */
export function gaussian(rnd: () => number): number {
  const u = 1 - rnd()
  const v = rnd()
  return Math.sqrt(-2 * Math.log(u)) * Math.cos(2 * Math.PI * v)
}

/** Render an SVG document (black shapes on white) to a PNG buffer. */
export async function svgToPng(svg: string): Promise<Buffer> {
  return sharp(Buffer.from(svg)).flatten({ background: '#ffffff' }).png().toBuffer()
}

/** Render an SVG to a 1-bit bitmap (1 = dark), thresholding the grey at 128. */
export async function svgToBitmap(svg: string): Promise<{ bitmap: Uint8Array, width: number, height: number }> {
  const { data, info } = await sharp(Buffer.from(svg)).flatten({ background: '#ffffff' }).greyscale().raw().toBuffer({ resolveWithObject: true })
  const bitmap = new Uint8Array(info.width * info.height)
  for (let i = 0; i < bitmap.length; i++) bitmap[i] = data[i * info.channels]! < 128 ? 1 : 0
  return { bitmap, width: info.width, height: info.height }
}

export function svgDoc(width: number, height: number, body: string): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}" viewBox="0 0 ${width} ${height}">`
    + `<rect width="${width}" height="${height}" fill="#fff"/>${body}</svg>`
}

/** Debian's potrace (the reference C tracer). */
export const POTRACE = '/usr/bin/potrace'

/** Fail with a clear message when a Debian tool a reference check needs is missing. */
export function requireTool(path: string, debianPackage: string): void {
  if (!existsSync(path)) {
    throw new Error(`${path} is missing: this test compares against it. Install it with: apt-get install ${debianPackage}`)
  }
}

/** A 1-bit bitmap (1 = ink) as PBM P4 (Netpbm): 1 = black, rows padded to whole bytes, MSB first. */
export function toPbm(bitmap: Uint8Array, width: number, height: number): Buffer {
  const rowBytes = Math.ceil(width / 8)
  const bits = Buffer.alloc(rowBytes * height)
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) if (bitmap[y * width + x]) bits[y * rowBytes + (x >> 3)]! |= 0x80 >> (x & 7)
  }
  return Buffer.concat([Buffer.from(`P4\n${width} ${height}\n`), bits])
}

/**
 * Run Debian's potrace on a bitmap with the given arguments (e.g. a backend and parameters)
 * and return what it wrote.
 */
export function runPotrace(bitmap: Uint8Array, width: number, height: number, args: string[]): string {
  requireTool(POTRACE, 'potrace')
  const dir = mkdtempSync(join(tmpdir(), 'decalwright-ref-'))
  try {
    writeFileSync(join(dir, 'in.pbm'), toPbm(bitmap, width, height))
    execFileSync(POTRACE, [...args, '-o', join(dir, 'out'), join(dir, 'in.pbm')])
    return readFileSync(join(dir, 'out'), 'utf8')
  } finally {
    rmSync(dir, { recursive: true, force: true })
  }
}

/** Debian's Python, with python3-skimage (scikit-image, SciPy, NumPy). */
export const DEBIAN_PYTHON = '/usr/bin/python3'

export interface ReferenceNarrowest {
  widthPx: number | null
  at?: { x: number, y: number }
  skeletonPixels: number
  bodyPixels: number
}

/**
 * The narrowest stroke of each bitmap (1 = ink) by reference/narrowest.py: scikit-image's
 * medial axis and SciPy's Euclidean distance transform (Debian package python3-skimage).
 */
export function referenceNarrowest(bitmaps: Array<{ bitmap: Uint8Array, width: number, height: number }>): ReferenceNarrowest[] {
  requireTool(DEBIAN_PYTHON, 'python3')
  const script = join(dirname(fileURLToPath(import.meta.url)), 'reference', 'narrowest.py')
  const input = JSON.stringify(bitmaps.map((b) => ({ width: b.width, height: b.height, ink: Buffer.from(b.bitmap).toString('base64') })))
  let out: string
  try {
    out = execFileSync(DEBIAN_PYTHON, [script], { input, encoding: 'utf8', maxBuffer: 1 << 26 })
  } catch (e) {
    throw new Error(`${script} failed (it needs Debian's python3-skimage: apt-get install python3-skimage): ${(e as Error).message}`)
  }
  return JSON.parse(out) as ReferenceNarrowest[]
}
