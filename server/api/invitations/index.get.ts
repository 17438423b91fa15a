import { useDb } from '#server/platform/db'
import { listInvitations } from '#server/people/invitations'

export default defineEventHandler(async (event) => listInvitations(useDb(), await requireCan(event, 'people.manage')))
