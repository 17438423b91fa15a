export default defineEventHandler(async (event) => {
  const actor = await requireActor(event)
  return findRobot(actor, idParam(event))
})
