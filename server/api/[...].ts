// Unknown API paths answer in JSON, not with the app's HTML page.
export default defineEventHandler(() => {
  throw createError({ statusCode: 404, message: 'No such API route.' })
})
