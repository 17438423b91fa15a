export default defineEventHandler(async (event) => previewReset(getRouterParam(event, 'token') ?? ''))
