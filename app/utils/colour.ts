/**
 * A plain-words name for a team colour, so a swatch is never the only way to tell
 * teams apart (colour-blind readers, greyscale printouts).
 */
export function colourName(hex: string): string {
  const m = /^#?([0-9a-f]{6})$/i.exec(hex.trim())
  if (!m) return 'No colour'
  const n = Number.parseInt(m[1]!, 16)
  const r = ((n >> 16) & 255) / 255
  const g = ((n >> 8) & 255) / 255
  const b = (n & 255) / 255
  const max = Math.max(r, g, b)
  const min = Math.min(r, g, b)
  const l = (max + min) / 2
  const d = max - min
  const s = d === 0 ? 0 : d / (1 - Math.abs(2 * l - 1))
  let h = 0
  if (d !== 0) {
    if (max === r) h = 60 * (((g - b) / d) % 6)
    else if (max === g) h = 60 * ((b - r) / d + 2)
    else h = 60 * ((r - g) / d + 4)
  }
  if (h < 0) h += 360

  if (l < 0.1) return 'Black'
  if (l > 0.94) return 'White'
  if (s < 0.12) return l < 0.35 ? 'Dark grey' : l > 0.7 ? 'Light grey' : 'Grey'

  let base: string
  if (h < 15 || h >= 345) base = 'red'
  else if (h < 40) base = l < 0.4 ? 'brown' : 'orange'
  else if (h < 65) base = l < 0.35 ? 'olive' : 'yellow'
  else if (h < 160) base = 'green'
  else if (h < 195) base = 'teal'
  else if (h < 250) base = 'blue'
  else if (h < 290) base = 'purple'
  else base = 'pink'

  const shade = l < 0.3 ? 'Dark ' : l > 0.75 ? 'Light ' : ''
  const word = shade ? shade + base : base.charAt(0).toUpperCase() + base.slice(1)
  return word
}
