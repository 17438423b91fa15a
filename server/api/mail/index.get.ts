export default defineEventHandler(async (event) => {
  await requireMentor(event)
  const dir = outboxDir()
  if (!dir) throw createError({ statusCode: 404, message: 'The local mail fake is not in use.' })
  return listOutbox(dir)
})
