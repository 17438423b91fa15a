import { useDb } from '#server/platform/db'
import { describeMe } from '#server/auth/service'

export default defineEventHandler(async (event) => describeMe(useDb(), await requireActor(event)))
