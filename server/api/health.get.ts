import { sql } from 'drizzle-orm'

/** Liveness of the app and its database: 200 `{ ok: true }`, or 503 with a message. */
export default defineEventHandler(async () => {
  try {
    await useDb().execute(sql`SELECT 1`)
    return { ok: true }
  }
  catch (err) {
    throw createError({ status: 503, message: `The database does not answer: ${(err as Error).message}` })
  }
})
