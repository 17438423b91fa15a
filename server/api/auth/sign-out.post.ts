export default defineEventHandler(async (event) => {
  await endCurrentSession(event)
  setResponseStatus(event, 204)
  return null
})
