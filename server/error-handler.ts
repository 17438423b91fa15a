// The first of Nitro's error handlers. A database or file store that did not answer in time,
// could not be reached or had no free connection (server/platform/faults.ts) is answered 503
// with a plain sentence naming the service, never a 500 with a stack; Nuxt's and Nitro's
// handlers after this one write that answer (JSON for the API, the error page for a page). The
// app needs no restart: the database pool drops connections that timed out and the next
// request opens fresh ones; the object store's client does the same.
import { setResponseHeader } from 'h3'
import { serviceFault } from './platform/faults'

export default defineNitroErrorHandler((error, event) => {
  const fault = serviceFault(error)
  if (!fault) return
  console.error(`[decalwright] ${fault.service} unavailable: ${fault.reason}`)
  // Whatever wrapped it on the way, the answer is the fault's own.
  error.statusCode = fault.statusCode
  error.statusMessage = fault.statusMessage
  error.message = fault.message
  error.unhandled = false
  if (!event.handled) setResponseHeader(event, 'retry-after', 5)
})
