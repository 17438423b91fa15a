import { useDb } from '#server/platform/db'
import { listTeams } from '#server/people/service'

export default defineEventHandler(async (event) => listTeams(useDb(), await requireActor(event)))
