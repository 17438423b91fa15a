// Typed errors of the pipeline, so callers can answer with a clear message and status.

/** The source cannot be read or the request does not fit it (crop outside the image…). */
export class PrepareError extends Error {
  override readonly name = 'PrepareError'
  constructor(message: string, options?: { cause?: unknown }) {
    super(message, options)
  }
}

/** The outline has more nodes than the pipeline accepts. */
export class TooComplexError extends Error {
  override readonly name = 'TooComplexError'
  constructor(readonly nodes: number, readonly nodeCap: number) {
    super(
      `The outline would have ${nodes > nodeCap ? `about ${nodes.toLocaleString('en-GB')}` : 'too many'} nodes, more than the limit of ${nodeCap.toLocaleString('en-GB')}. `
      + 'Raise the speck filter (to drop more small specks) or the curve tolerance (to join more curves), '
      + 'or check the threshold and lighting evening: a noisy prepared bitmap gives thousands of tiny shapes.',
    )
  }
}

/** Default largest node count of one outline. */
export const DEFAULT_NODE_CAP = 60_000

/** Why a source cannot become a decal. */
export type NotADrawingReason = 'too-small' | 'blank' | 'all-ink' | 'scene' | 'specks'

/**
 * The source cannot become a decal: it is no drawing (a photograph of a scene), no ink was
 * found, everything is ink, or most pieces are too small to weed. The message says plainly
 * what is wrong and what to do.
 */
export class NotADrawingError extends Error {
  override readonly name = 'NotADrawingError'
  constructor(readonly reason: NotADrawingReason, message: string) {
    super(message)
  }
}
