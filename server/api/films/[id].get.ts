import { useDb } from '#server/platform/db'
import { filmDetail } from '#server/films/service'

export default defineEventHandler(async (event) => filmDetail(useDb(), await requireActor(event), idParam(event)))
