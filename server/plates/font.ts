// Fonts shipped for number plates, read with opentype.js into outlines.
//
// Each font is an open-licence font from an npm package (WOFF: opentype.js reads WOFF, not
// WOFF2). The plate font is a heavy, plain grotesque whose numerals have thick strokes and open
// counters, so plates meet stroke rules at small heights and read from afar.
import { readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import opentype from 'opentype.js'

export interface PlateFontInfo {
  id: string
  family: string
  style: string
  weight: number
  /** npm package that ships the font, and the file and licence inside it. */
  package: string
  file: string
  licence: string
  licenceFile: string
}

export const PLATE_FONTS: readonly PlateFontInfo[] = [
  {
    id: 'work-sans-black',
    family: 'Work Sans',
    style: 'Black',
    weight: 900,
    package: '@fontsource/work-sans',
    file: 'files/work-sans-latin-900-normal.woff',
    licence: 'OFL-1.1',
    licenceFile: 'LICENSE',
  },
]
export const DEFAULT_PLATE_FONT_ID = 'work-sans-black'

export interface PlateFont {
  info: PlateFontInfo
  font: opentype.Font
}

export function plateFontInfo(id: string): PlateFontInfo {
  const info = PLATE_FONTS.find((f) => f.id === id)
  if (!info) throw new RangeError(`No plate font "${id}"; the shipped fonts are ${PLATE_FONTS.map((f) => f.id).join(', ')}.`)
  return info
}

const require = createRequire(import.meta.url)

/** Where the font file is on disk (resolved through the package, as Node resolves it). */
export function plateFontPath(info: PlateFontInfo): string {
  return require.resolve(`${info.package}/${info.file}`)
}

/** Where the font's licence is on disk. */
export function plateFontLicencePath(info: PlateFontInfo): string {
  return require.resolve(`${info.package}/${info.licenceFile}`)
}

/** A font from its bytes (for callers that keep the file elsewhere, e.g. as a server asset). */
export function parsePlateFont(info: PlateFontInfo, bytes: Uint8Array): PlateFont {
  const buffer = bytes.buffer.slice(bytes.byteOffset, bytes.byteOffset + bytes.byteLength)
  const font = opentype.parse(buffer)
  if (!font.supported) throw new Error(`The font file of ${info.family} ${info.style} could not be read.`)
  return { info, font }
}

const loaded = new Map<string, PlateFont>()

/** A shipped font, read once per process. */
export function loadPlateFont(id: string = DEFAULT_PLATE_FONT_ID): PlateFont {
  let f = loaded.get(id)
  if (!f) {
    const info = plateFontInfo(id)
    f = parsePlateFont(info, readFileSync(plateFontPath(info)))
    loaded.set(id, f)
  }
  return f
}
