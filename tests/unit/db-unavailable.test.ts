import { afterEach, describe, expect, it, vi } from 'vitest'
import { POOL_ACQUIRE_TIMEOUT, databaseUnavailableCode, noteDatabaseOutage } from '../../server/utils/db-unavailable'

/** An error shaped as mysql2 makes them (code, errno, fatal), wrapped the way drizzle and h3 wrap it. */
function wrapped(fields: Record<string, unknown>) {
  const driver = Object.assign(new Error('driver text'), fields)
  const drizzle = new Error('Failed query: select 1', { cause: driver })
  return Object.assign(new Error('wrapped'), { statusCode: 500, cause: drizzle })
}

describe('databaseUnavailableCode', () => {
  it.each([
    ['ECONNREFUSED', { code: 'ECONNREFUSED', errno: -111, fatal: true }],
    ['PROTOCOL_CONNECTION_LOST', { code: 'PROTOCOL_CONNECTION_LOST', fatal: true }],
    ['ETIMEDOUT', { code: 'ETIMEDOUT', fatal: true }],
    ['ER_CON_COUNT_ERROR', { code: 'ER_CON_COUNT_ERROR', errno: 1040 }],
    ['ER_SERVER_SHUTDOWN', { code: 'ER_SERVER_SHUTDOWN', errno: 1053 }],
    [POOL_ACQUIRE_TIMEOUT, { code: POOL_ACQUIRE_TIMEOUT }],
  ])('reads %s through the drizzle and h3 wrappers', (code, fields) => {
    expect(databaseUnavailableCode(wrapped(fields))).toBe(code)
  })

  // 1927 is ER_CONNECTION_KILLED in MariaDB's error reference; mysql2 has no name for it.
  it('reads a MariaDB-only error number the driver has no name for', () => {
    expect(databaseUnavailableCode(wrapped({ errno: 1927 }))).toBe('ERRNO_1927')
  })

  // 1047 is what a Galera node answers before it has joined the primary component (MariaDB's Galera documentation).
  it('reads a Galera node that is not ready yet (1047) as the database being away', () => {
    expect(databaseUnavailableCode(wrapped({ code: 'ER_UNKNOWN_COM_ERROR', errno: 1047 }))).toBe('ER_UNKNOWN_COM_ERROR')
  })

  it('reads mysql2\'s fatal "connection is in closed state" (a rollback after the server went away) as the database being away', () => {
    const closed = Object.assign(new Error('Can\'t add new command when connection is in closed state'), { fatal: true })
    const rollback = Object.assign(new Error('wrapped'), { statusCode: 500, cause: new Error('Failed query: rollback', { cause: closed }) })
    expect(databaseUnavailableCode(rollback)).toBe('CONNECTION_CLOSED')
    // The same words without the driver's fatal mark are someone else's error.
    expect(databaseUnavailableCode(wrapped({ message: 'connection is in closed state' }))).toBeNull()
  })

  it.each([
    ['a duplicate key', { code: 'ER_DUP_ENTRY', errno: 1062 }],
    ['a syntax error', { code: 'ER_PARSE_ERROR', errno: 1064 }],
    ['a lock wait', { code: 'ER_LOCK_WAIT_TIMEOUT', errno: 1205 }],
  ])('leaves %s alone', (_what, fields) => {
    expect(databaseUnavailableCode(wrapped(fields))).toBeNull()
  })

  it('leaves errors without a cause, and values that are not errors, alone', () => {
    expect(databaseUnavailableCode(new Error('plain'))).toBeNull()
    expect(databaseUnavailableCode(null)).toBeNull()
    expect(databaseUnavailableCode('ECONNREFUSED')).toBeNull()
  })
})

describe('noteDatabaseOutage', () => {
  afterEach(() => {
    vi.restoreAllMocks()
  })

  it('logs an outage as one line without a stack, at most once every ten seconds, counting the rest', () => {
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => {})
    const down = wrapped({ code: 'ECONNREFUSED' })
    const t0 = 1_000_000_000
    expect(noteDatabaseOutage(down, 'GET /api/builds', t0)).toBe(true)
    expect(noteDatabaseOutage(down, 'GET /api/builds', t0 + 1000)).toBe(true)
    expect(noteDatabaseOutage(down, 'the outbox', t0 + 2000)).toBe(true)
    expect(warn).toHaveBeenCalledTimes(1)
    expect(noteDatabaseOutage(down, 'the outbox', t0 + 10_000)).toBe(true)
    expect(warn).toHaveBeenCalledTimes(2)
    expect(warn.mock.calls[1]![0]).toMatch(/ECONNREFUSED.*the outbox.*2 more/)
    for (const [line] of warn.mock.calls) expect(line).not.toMatch(/\n\s+at /)
  })

  it('returns false for any other error, logging nothing', () => {
    const warn = vi.spyOn(console, 'warn').mockImplementation(() => {})
    expect(noteDatabaseOutage(new Error('something else'), 'GET /api/builds')).toBe(false)
    expect(warn).not.toHaveBeenCalled()
  })
})
