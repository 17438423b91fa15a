import { useDb } from '#server/platform/db'
import { previewInvitation } from '#server/people/invitations'

export default defineEventHandler(async (event) => previewInvitation(useDb(), tokenParam(event)))
