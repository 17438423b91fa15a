// The designer's colour settings for a revision or a preview (the tuning bench's colour
// panel): how many inks, colours picked from the source, inks merged or dropped (indices into
// the inks as found, lightest first), the stack order, how each lower layer meets the ones
// above, and whether the registration marks are cut.
import { z } from 'zod'

/** Indices of inks as found: at most six are found. */
const inkIndex = z.number().int().min(0).max(5)

export const colourSettingsSchema = z.object({
  /** 1 = one colour, as the single-colour pipeline makes it; 2–6 inks; null: as found. */
  count: z.number().int().min(1).max(6).nullable().default(null),
  /** Points of the upright source, as fractions of its width and height. */
  picks: z.array(z.object({ x: z.number().min(0).max(1), y: z.number().min(0).max(1), radius: z.number().min(0).max(0.2).optional() })).max(6).default([]),
  merge: z.array(z.tuple([inkIndex, inkIndex])).max(10).default([]),
  drop: z.array(inkIndex).max(6).default([]),
  /** The layers bottom first, as indices into the layers separated (lightest first); null keeps that order. */
  order: z.array(inkIndex).max(6).nullable().default(null),
  /** Per layer, bottom first; a layer without an entry runs 0.5 mm under the ones above. */
  stack: z.array(z.object({ mode: z.enum(['under', 'knock-out']), overlapMm: z.number().min(0).max(5) })).max(6).default([]),
  marks: z.boolean().default(true),
})

export type ColourSettings = z.infer<typeof colourSettingsSchema>
export type ColourSettingsInput = z.input<typeof colourSettingsSchema>
