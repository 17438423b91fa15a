import { hsl } from '#shared/utils/hsl'

/**
 * A plain-words name for a team colour, so a swatch is never the only way to tell
 * teams apart (colour-blind readers, greyscale printouts).
 */
export function colourName(hex: string): string {
  const c = hsl(hex)
  if (!c) return 'No colour'
  const { h, s, l } = c

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
