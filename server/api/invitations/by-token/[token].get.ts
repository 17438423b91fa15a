export default defineEventHandler(async (event) => previewInvitation(getRouterParam(event, 'token') ?? ''))
