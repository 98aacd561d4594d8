import { drizzle } from 'drizzle-orm/mysql2'
import mysql from 'mysql2/promise'
import * as schema from '../database/schema'
import { POOL_ACQUIRE_TIMEOUT, POOL_CLOSED, POOL_QUEUE_FULL } from './db-unavailable'

import type { Database } from '../database/types'

export type { Database }

/**
 * Pool limits chosen so a request fails fast (and answers 503) while MariaDB is away instead of hanging:
 * a connection attempt gives up after CONNECT_TIMEOUT_MS, a request waits at most ACQUIRE_TIMEOUT_MS for
 * a connection, and at most QUEUE_LIMIT requests wait at once. Dead connections leave the pool on their
 * own (mysql2 drops a connection on its error or end), so the pool recovers when MariaDB is back.
 */
const CONNECT_TIMEOUT_MS = 3000
const ACQUIRE_TIMEOUT_MS = 5000
const QUEUE_LIMIT = 200

let pool: mysql.Pool | undefined
let database: Database | undefined

type CorePool = mysql.Pool['pool']
type Acquired = Parameters<Parameters<CorePool['getConnection']>[0]>

function coded(message: string, code: string): Error {
  return Object.assign(new Error(message), { code })
}

/**
 * Bounds the wait for a connection: mysql2 queues a request until a connection is free, with no time
 * limit. A request still waiting after `ms` is refused; a connection handed over later goes straight back.
 */
function boundAcquire(core: CorePool, ms: number): void {
  const getConnection = core.getConnection.bind(core)
  core.getConnection = ((callback: (...args: Acquired) => void) => {
    let settled = false
    const timer = setTimeout(() => {
      settled = true
      callback(coded(`No database connection came free within ${ms} ms.`, POOL_ACQUIRE_TIMEOUT) as Acquired[0], undefined as unknown as Acquired[1])
    }, ms)
    getConnection((err, connection) => {
      if (settled) {
        if (!err) connection.release()
        return
      }
      settled = true
      clearTimeout(timer)
      // mysql2 gives these two refusals no code; name them so they read as "unavailable".
      if (err && !(err as { code?: string }).code) {
        if (err.message === 'Queue limit reached.') Object.assign(err, { code: POOL_QUEUE_FULL })
        else if (err.message === 'Pool is closed.') Object.assign(err, { code: POOL_CLOSED })
      }
      callback(err, connection)
    })
  }) as CorePool['getConnection']
}

/** The one database client of the server, created on first use from NUXT_DATABASE_URL. */
export function useDb(): Database {
  if (!database) {
    const url = useRuntimeConfig().databaseUrl
    if (!url) throw createError({ status: 503, message: 'The database is not configured (set NUXT_DATABASE_URL).' })
    pool = mysql.createPool({
      uri: url, connectionLimit: 10, timezone: 'Z', dateStrings: false, supportBigNumbers: true,
      connectTimeout: CONNECT_TIMEOUT_MS, queueLimit: QUEUE_LIMIT, enableKeepAlive: true,
    })
    boundAcquire(pool.pool, ACQUIRE_TIMEOUT_MS)
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
