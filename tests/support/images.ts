// Pictures made in test code: fictional drawings, never anyone's real logo.
import sharp from 'sharp'

/** A "drawing": a thick ring and a bar, dark ink on light paper, as an SVG string. */
export function drawingSvg(width = 1200, height = 800, ink = '#1b1b1b', paper = '#f4f1ea'): string {
  return `<svg xmlns="http://www.w3.org/2000/svg" width="${width}" height="${height}">
  <rect width="100%" height="100%" fill="${paper}"/>
  <circle cx="${width * 0.35}" cy="${height / 2}" r="${height * 0.32}" fill="${ink}"/>
  <circle cx="${width * 0.35}" cy="${height / 2}" r="${height * 0.16}" fill="${paper}"/>
  <rect x="${width * 0.62}" y="${height * 0.2}" width="${width * 0.08}" height="${height * 0.6}" fill="${ink}"/>
</svg>`
}

export async function drawing(format: 'png' | 'jpeg' | 'webp' | 'tiff' | 'gif' | 'avif' = 'png', width = 1200, height = 800): Promise<Buffer> {
  const img = sharp(Buffer.from(drawingSvg(width, height)))
  switch (format) {
    case 'png': return img.png().toBuffer()
    case 'jpeg': return img.jpeg({ quality: 90 }).toBuffer()
    case 'webp': return img.webp({ quality: 90 }).toBuffer()
    case 'tiff': return img.tiff().toBuffer()
    case 'gif': return img.gif().toBuffer()
    case 'avif': return img.avif({ quality: 60, effort: 0 }).toBuffer()
  }
}

/** Random salt-and-pepper noise: the worst case for a tracer. */
export async function noise(width: number, height: number, seed = 1): Promise<Buffer> {
  const data = Buffer.alloc(width * height)
  let s = seed
  for (let i = 0; i < data.length; i++) {
    s = (s * 1103515245 + 12345) & 0x7fffffff
    data[i] = s & 0x100 ? 0 : 255
  }
  return sharp(data, { raw: { width, height, channels: 1 } }).png().toBuffer()
}
