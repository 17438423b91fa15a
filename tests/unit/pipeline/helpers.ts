// Test helpers: a seeded random generator and test images drawn in code.
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
