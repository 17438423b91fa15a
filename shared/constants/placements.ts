// How many copies a placement or a reprint may ask for.
export const PLACEMENT_LIMITS = {
  quantity: { min: 1, max: 200 },
  spares: { min: 0, max: 200, default: 0 },
  reprint: { min: 1, max: 200 },
} as const
