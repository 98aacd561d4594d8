import { STATUS_CODES } from 'node:http'
import { setResponseHeader } from 'h3'
import { defineNitroErrorHandler } from 'nitropack/runtime'
import { DATABASE_RETRY_AFTER_S, DATABASE_UNAVAILABLE_MESSAGE, noteDatabaseOutage } from './utils/db-unavailable'

/** A page answering 503 cannot say which service failed it; this is what its error page says. */
const PAGE_UNAVAILABLE_MESSAGE = 'This page cannot be shown just now because a service it needs is unavailable. Try again in a few seconds.'
const INTERNAL_MESSAGE = 'Something went wrong on our side. Try again; if it keeps happening, tell us what you were doing.'

/**
 * The first error handler (nuxt.config `nitro.errorHandler`): it only shapes the error and never answers,
 * so Nuxt's handler then renders error.vue for a page and Nitro's answers JSON for everything else.
 * - A database that is away (connection refused, lost, timed out, pool full) becomes 503 with Retry-After
 *   and a plain message, never the driver's text; so does any other 503, pages included.
 * - A 4xx keeps its own message and data (Nitro hides the message of a "fatal" error, which is how pages
 *   throw) and gets its reason phrase instead of "Server Error".
 * - A deliberate 500 has its message logged and replaced: such messages name storage keys and rows.
 */
export default defineNitroErrorHandler((error, event) => {
  const where = `${event.method} ${event.path}`
  if (noteDatabaseOutage(error, where)) {
    Object.assign(error, { statusCode: 503, statusMessage: undefined, message: DATABASE_UNAVAILABLE_MESSAGE, data: undefined, unhandled: false, fatal: false })
  }
  const status = error.statusCode || 500
  if (status === 503) {
    setResponseHeader(event, 'retry-after', DATABASE_RETRY_AFTER_S)
    if (!event.path.startsWith('/api/')) Object.assign(error, { message: PAGE_UNAVAILABLE_MESSAGE, statusMessage: undefined, fatal: false })
  }
  else if (status < 500) {
    error.fatal = false
  }
  else if (status === 500 && !error.unhandled) {
    console.error(`[request error] 500 [${where}]: ${error.message}`)
    Object.assign(error, { message: INTERNAL_MESSAGE, data: undefined })
  }
  // Nitro names every status without one "Server Error"; give the reason phrase (RFC 9110 §15).
  if (!error.statusMessage || error.statusMessage === 'Server Error') error.statusMessage = STATUS_CODES[status] ?? 'Error'
})
