export default defineEventHandler(async (event) => artworkHistory(await requireActor(event), idParam(event)))
