// One name for each measure and each recurring action, used by every page that shows it, so
// a person never meets two words for one thing ("narrowest feature" here, "narrowest stroke"
// there). Plain strings: the server's mail and the pages both read them.

/** The measurements of a revision at its physical size. */
export const MEASURE = {
  size: 'Size',
  width: 'Width',
  height: 'Height',
  inkArea: 'Ink area',
  cutLength: 'Cut length',
  pieces: 'Pieces',
  holes: 'Holes',
  piecesAndHoles: 'Pieces and holes',
  nodes: 'Nodes',
  narrowest: 'Narrowest stroke',
  smallPieces: 'Small pieces',
  fidelity: 'Fidelity',
  threshold: 'Threshold used',
  cutTime: 'Estimated cut time',
} as const

/** What a measure's name means, where a page has room to say it. */
export const MEASURE_HINT = {
  cutLength: 'every outline, holes included',
  nodes: 'lines and curves in the clean vector',
  narrowest: 'the thinnest line of ink',
  smallPieces: 'easily lost when weeding',
} as const

/** Recurring actions, named once. */
export const ACTION = {
  saveRevision: 'Save as revision',
  submitForReview: 'Submit for review',
  openBench: 'Open the tuning bench',
  compareRevisions: 'Compare revisions',
} as const

/** "Small pieces under 1 mm²": the measure's name with the limit it was counted against. */
export function smallPiecesUnder(limit: string): string {
  return `${MEASURE.smallPieces} under ${limit}`
}
