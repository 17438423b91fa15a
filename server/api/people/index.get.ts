import { useDb } from '#server/platform/db'
import { listPeople } from '#server/people/service'

export default defineEventHandler(async (event) => listPeople(useDb(), await requireCan(event, 'people.manage')))
