import { dbReady } from '../platform/db'

export default defineEventHandler(async (event) => {
  if (event.path.startsWith('/api/')) await dbReady()
})
