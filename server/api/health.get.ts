import { sql } from 'drizzle-orm'

/**
 * Liveness of the app and its database: 200 `{ ok: true }`, or 503 with Retry-After and a plain message.
 * Public, so it never repeats the driver's text (that names the host, the port and the query).
 */
export default defineEventHandler(async (event) => {
  try {
    await useDb().execute(sql`SELECT 1`)
    return { ok: true }
  }
  catch (err) {
    if (!noteDatabaseOutage(err, 'GET /api/health')) console.error(`[health] the database check failed: ${(err as Error).message}`)
    setResponseHeader(event, 'retry-after', DATABASE_RETRY_AFTER_S)
    throw createError({ status: 503, message: 'The database does not answer.' })
  }
})
