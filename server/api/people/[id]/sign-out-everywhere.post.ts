import { useDb } from '#server/platform/db'
import { signOutEverywhere } from '#server/people/service'

export default defineEventHandler(async (event) => {
  const actor = await requireCan(event, 'people.manage')
  await signOutEverywhere(useDb(), actor, idParam(event))
  setResponseStatus(event, 204)
  return null
})
