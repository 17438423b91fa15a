import type { PlateColour } from '#shared/plates/profiles'

/** Screen colours for drawing a plate's layers in the preview (the film decides the real colour). */
export const PLATE_SCREEN_COLOURS: Record<PlateColour, string> = {
  white: '#ffffff', black: '#1c1c1c', red: '#c3272f', blue: '#1f4fa0', yellow: '#f2c21b',
  green: '#23844a', orange: '#e3701d', purple: '#6b3fa0', grey: '#8a8a8a',
}

/** The inner markup of a clean vector (its paths), to draw layers in register inside one <svg>. */
export function svgPaths(svg: string): string[] {
  return [...svg.matchAll(/<path\b[^>]*\bd="([^"]*)"/g)].map((m) => m[1]!)
}
