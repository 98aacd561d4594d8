import { drizzle } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import * as schema from '../database/schema'

import type { Database } from '../database/types'

export type { Database }

let pool: mysql.Pool | undefined
let database: Database | undefined

/** The one database client of the server, created on first use from NUXT_DATABASE_URL. */
export function useDb(): Database {
  if (!database) {
    const url = useRuntimeConfig().databaseUrl
    if (!url) throw createError({ status: 503, message: 'The database is not configured (set NUXT_DATABASE_URL).' })
    pool = mysql.createPool({ uri: url, connectionLimit: 10, timezone: 'Z', dateStrings: false, supportBigNumbers: true })
    database = drizzle(pool, { schema, mode: 'default' })
  }
  return database
}

/** Closes the pool (used when the server shuts down). */
export async function closeDb(): Promise<void> {
  await pool?.end()
  pool = undefined
  database = undefined
}

export { schema }
