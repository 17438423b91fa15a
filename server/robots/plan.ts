// What a change to a placement means for the cut queue, worked out before anything is written.
// Plain code: no database, no Nuxt.

export interface PlacementState {
  spot: string
  widthMm: number
  /** Copies on the robot. */
  quantity: number
  /** Spares wanted. */
  spares: number
  /** Cut copies not on the robot. */
  sparesOnHand: number
}

export type PlacementPatch = Partial<Pick<PlacementState, 'spot' | 'widthMm' | 'quantity' | 'spares'>>

export interface PlacementPlan {
  after: Omit<PlacementState, 'sparesOnHand'>
  /** Every field that changes, from → to. */
  changes: Record<string, { from: unknown; to: unknown }>
  /** A new width: every copy must be cut again at the new size. */
  resized: boolean
  /** Copies to queue as a new job (never added to a job that exists). */
  copiesToQueue: number
  /** Cut spares at the old size that no longer count. */
  setAside: number
  /** Copies already cut or queued beyond what the placement needs now. */
  surplus: number
}

/**
 * The placement after `patch`, and what it asks of the cut queue. The same width: more copies
 * (on the robot plus spares) than before are queued, fewer leave a surplus that nothing cuts
 * away silently. A new width: all copies again, at the new size.
 */
export function planPlacementChange(before: PlacementState, patch: PlacementPatch): PlacementPlan {
  const after = {
    spot: patch.spot ?? before.spot,
    widthMm: patch.widthMm ?? before.widthMm,
    quantity: patch.quantity ?? before.quantity,
    spares: patch.spares ?? before.spares,
  }
  const changes: PlacementPlan['changes'] = {}
  for (const key of ['spot', 'widthMm', 'quantity', 'spares'] as const) {
    if (after[key] !== before[key]) changes[key] = { from: before[key], to: after[key] }
  }
  const resized = after.widthMm !== before.widthMm
  const wanted = after.quantity + after.spares
  if (resized) return { after, changes, resized, copiesToQueue: wanted, setAside: before.sparesOnHand, surplus: 0 }
  const delta = wanted - (before.quantity + before.spares)
  return { after, changes, resized, copiesToQueue: Math.max(0, delta), setAside: 0, surplus: Math.max(0, -delta) }
}
