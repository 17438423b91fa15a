// A 1-bit ink/paper bitmap as a PNG with a 2-colour palette, written directly: the format is
// simple enough that packing the bits and deflating them takes a few milliseconds, where a
// general encoder's palette quantisation took a tenth of a second on a prepared bitmap.
//
// W3C, Portable Network Graphics (PNG) Specification (Second Edition), ISO/IEC 15948:2003:
// signature; chunks of length, type, data and CRC-32 over type and data (§5.3); IHDR with
// colour type 3 (indexed) at bit depth 1 (§11.2.2); PLTE (§11.2.3); IDAT, the zlib stream of
// every row's filter-type byte followed by its pixels packed most significant bit first, rows
// padded to whole bytes (§7.2, §9.2, filter type 0 = None); IEND.
import { crc32, deflateSync } from 'node:zlib'

const SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])

function chunk(type: string, data: Buffer): Buffer {
  const out = Buffer.alloc(12 + data.length)
  out.writeUInt32BE(data.length, 0)
  out.write(type, 4, 'latin1')
  data.copy(out, 8)
  out.writeUInt32BE(crc32(out.subarray(4, 8 + data.length)), 8 + data.length)
  return out
}

/**
 * Non-zero = ink (drawn black), 0 = paper (white), row-major width × height → PNG bytes. Palette
 * index 0 is white and 1 black, so each pixel's bit is the bitmap's value. `level` is zlib's
 * (1 fastest … 9 smallest); the same input and level always give the same bytes.
 */
export function bilevelPng(bitmap: Uint8Array, width: number, height: number, level = 9): Buffer {
  if (!(width >= 1 && height >= 1) || bitmap.length !== width * height) throw new RangeError('Bitmap size does not match width × height.')
  const rowBytes = Math.ceil(width / 8)
  const stride = rowBytes + 1
  const raw = Buffer.alloc(stride * height) // filter byte 0 (None) leads each row
  const whole = width & ~7
  for (let y = 0; y < height; y++) {
    const src = y * width
    let o = y * stride + 1
    let x = 0
    for (; x < whole; x += 8, o++) {
      const i = src + x
      // (v + 255) >> 8 is 1 for any non-zero byte, 0 for zero
      raw[o] = (((bitmap[i]! + 255) >> 8) << 7) | (((bitmap[i + 1]! + 255) >> 8) << 6) | (((bitmap[i + 2]! + 255) >> 8) << 5)
        | (((bitmap[i + 3]! + 255) >> 8) << 4) | (((bitmap[i + 4]! + 255) >> 8) << 3) | (((bitmap[i + 5]! + 255) >> 8) << 2)
        | (((bitmap[i + 6]! + 255) >> 8) << 1) | ((bitmap[i + 7]! + 255) >> 8)
    }
    if (x < width) {
      let b = 0
      for (let k = 0; x < width; x++, k++) b |= (bitmap[src + x]! ? 1 : 0) << (7 - k)
      raw[o] = b
    }
  }
  const ihdr = Buffer.alloc(13)
  ihdr.writeUInt32BE(width, 0)
  ihdr.writeUInt32BE(height, 4)
  ihdr[8] = 1 // bit depth
  ihdr[9] = 3 // colour type: indexed
  // compression 0 (deflate), filter method 0, interlace 0 (none): already zero
  const plte = Buffer.from([0xff, 0xff, 0xff, 0, 0, 0])
  return Buffer.concat([SIGNATURE, chunk('IHDR', ihdr), chunk('PLTE', plte), chunk('IDAT', deflateSync(raw, { level })), chunk('IEND', Buffer.alloc(0))])
}
