// One-channel 8-bit images through sharp. Sharp turns raw one-channel input into three
// channels on output unless told otherwise, so every grey round trip ends in 'b-w' and
// checks what came back.
import sharp, { type Sharp } from 'sharp'

function asU8(b: Buffer): Uint8Array {
  return new Uint8Array(b.buffer, b.byteOffset, b.length)
}

async function finish(img: Sharp, width: number, height: number): Promise<Uint8Array> {
  const { data, info } = await img.toColourspace('b-w').raw({ depth: 'uchar' }).toBuffer({ resolveWithObject: true })
  if (info.channels !== 1 || info.width !== width || info.height !== height) {
    throw new Error(`Expected a ${width} × ${height} one-channel image, got ${info.width} × ${info.height} × ${info.channels}.`)
  }
  return asU8(data)
}

/** Resample a grey image: Lanczos-3 when shrinking, cubic when enlarging (less ringing). */
export async function resizeGrey(grey: Uint8Array, width: number, height: number, toWidth: number, toHeight: number): Promise<Uint8Array> {
  if (toWidth === width && toHeight === height) return grey
  const img = sharp(grey, { raw: { width, height, channels: 1 } })
    .resize(toWidth, toHeight, { fit: 'fill', kernel: toWidth * toHeight < width * height ? 'lanczos3' : 'cubic' })
  return finish(img, toWidth, toHeight)
}

/** Gaussian blur of a grey image with standard deviation sigma (pixels, at least 0.3). */
export async function blurGrey(grey: Uint8Array, width: number, height: number, sigma: number): Promise<Uint8Array> {
  return finish(sharp(grey, { raw: { width, height, channels: 1 } }).blur(Math.max(0.3, sigma)), width, height)
}

/** Half-size copy of a grey image (means of 2 × 2 pixels; an odd last row or column is left out). */
export function halveGrey(img: Uint8Array, width: number, height: number): { img: Uint8Array, width: number, height: number } {
  const w = width >> 1, h = height >> 1
  const out = new Uint8Array(w * h)
  for (let y = 0; y < h; y++) {
    for (let x = 0; x < w; x++) {
      const i = 2 * y * width + 2 * x
      out[y * w + x] = (img[i]! + img[i + 1]! + img[i + width]! + img[i + width + 1]! + 2) >> 2
    }
  }
  return { img: out, width: w, height: h }
}
