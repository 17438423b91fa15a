// Start the migrations as the server boots, so the first request does not pay for them.
export default defineNitroPlugin(() => {
  dbReady().catch((err) => console.error('[decalwright] migrations failed:', err))
})
