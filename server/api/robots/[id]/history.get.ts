export default defineEventHandler(async (event) => robotHistory(await requireActor(event), idParam(event)))
