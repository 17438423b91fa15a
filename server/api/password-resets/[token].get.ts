import { useDb } from '#server/platform/db'
import { previewReset } from '#server/auth/service'

export default defineEventHandler(async (event) => previewReset(useDb(), tokenParam(event)))
