// Telling "the database is away" apart from every other failure, so the server answers 503 for it.
// Pure: no Nitro globals, so the unit tier checks it too.

/** Codes the pool wrapper in db.ts gives its own refusals (mysql2 leaves them without a code). */
export const POOL_QUEUE_FULL = 'POOL_QUEUE_FULL'
export const POOL_ACQUIRE_TIMEOUT = 'POOL_ACQUIRE_TIMEOUT'
export const POOL_CLOSED = 'POOL_CLOSED'

/** Node socket codes and mysql2 client codes of a connection that could not be made or was lost, and the pool's own. */
const UNAVAILABLE_CODES = new Set([
  'ECONNREFUSED', 'ECONNRESET', 'ETIMEDOUT', 'EPIPE', 'EHOSTUNREACH', 'ENETUNREACH', 'ENOTFOUND', 'EAI_AGAIN',
  'PROTOCOL_CONNECTION_LOST', 'PROTOCOL_SEQUENCE_TIMEOUT', 'PROTOCOL_ENQUEUE_AFTER_FATAL_ERROR',
  'ER_CON_COUNT_ERROR', 'ER_TOO_MANY_USER_CONNECTIONS', 'ER_SERVER_SHUTDOWN', 'ER_NORMAL_SHUTDOWN', 'ER_SHUTDOWN_COMPLETE',
  'ER_ABORTING_CONNECTION', 'ER_NEW_ABORTING_CONNECTION', 'ER_CONNECTION_KILLED',
  POOL_QUEUE_FULL, POOL_ACQUIRE_TIMEOUT, POOL_CLOSED,
])

/**
 * Server error numbers of the same (MariaDB error codes reference): 1040 too many connections,
 * 1053 server shutdown in progress, 1077 normal shutdown, 1079 shutdown complete, 1152 and 1184
 * aborted connection, 1203 too many connections for the user, 1927 connection killed (MariaDB's own),
 * and 1047, which a Galera node answers while it is not part of the primary component or still
 * joining ("WSREP has not yet prepared node for application use", MariaDB's Galera documentation).
 */
const UNAVAILABLE_ERRNOS = new Set([1040, 1047, 1053, 1077, 1079, 1152, 1184, 1203, 1927])

/** mysql2's error for a command on a connection it has already closed (a fatal error without a code, for example a rollback after the server went away). */
const CLOSED_CONNECTION = /connection is in closed state/i
export const CONNECTION_CLOSED = 'CONNECTION_CLOSED'

interface CodedError { code?: unknown, errno?: unknown, cause?: unknown }

/**
 * The code of the connection-level database failure somewhere in an error's cause chain (h3 and
 * drizzle each wrap the driver's error once), or null when the error is something else.
 */
export function databaseUnavailableCode(error: unknown): string | null {
  let current: unknown = error
  for (let depth = 0; depth < 8 && current && typeof current === 'object'; depth++) {
    const { code, errno, cause } = current as CodedError
    if (typeof code === 'string' && UNAVAILABLE_CODES.has(code)) return code
    if (typeof errno === 'number' && UNAVAILABLE_ERRNOS.has(errno)) return typeof code === 'string' ? code : `ERRNO_${errno}`
    if ((current as { fatal?: unknown }).fatal === true && current instanceof Error && CLOSED_CONNECTION.test(current.message)) return CONNECTION_CLOSED
    current = cause
  }
  return null
}

/** What a person reads while the database is away (never the driver's text: it names hosts and queries). */
export const DATABASE_UNAVAILABLE_MESSAGE = 'Torquewright cannot reach its database just now. Try again in a few seconds.'

/** Seconds a client is asked to wait before trying again (Retry-After, RFC 9110 §10.2.3). */
export const DATABASE_RETRY_AFTER_S = 5

/** One outage line at most every OUTAGE_LOG_EVERY_MS, however many requests and timers meet it. */
const OUTAGE_LOG_EVERY_MS = 10_000
let lastOutageLog = 0
let quietSince = 0

/**
 * Logs a database outage met by `what` as one line without a stack, at most once every ten seconds
 * (counting the rest), and returns true; returns false for any other error, which the caller logs itself.
 */
export function noteDatabaseOutage(error: unknown, what: string, now = Date.now()): boolean {
  const code = databaseUnavailableCode(error)
  if (!code) return false
  if (now - lastOutageLog >= OUTAGE_LOG_EVERY_MS) {
    const more = quietSince ? ` (${quietSince} more since the last line)` : ''
    console.warn(`[db] MariaDB is unavailable (${code}) for ${what}${more}`)
    lastOutageLog = now
    quietSince = 0
  }
  else {
    quietSince++
  }
  return true
}
