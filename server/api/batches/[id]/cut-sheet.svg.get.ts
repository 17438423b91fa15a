// One sheet per file: ?sheet=N picks it (default 1); the batch page lists how many there are.
export default batchSheetHandler('svg')
